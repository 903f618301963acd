"""Writing result files without ever losing what the user wrote (the command line's only
file output): every target is checked before anything is written; an existing file is
replaced only when asked (--force), and then in one step; the case file never."""

from __future__ import annotations

import os
import pathlib
import tempfile

from .errors import CaseError

__all__ = ["write_files"]


def write_files(files: dict[pathlib.Path, str | bytes], *, force: bool, case: str,
                where: str = "--output") -> None:
    """Write ``files`` (path -> text or bytes). Raises CaseError, before writing anything,
    if a target is the case file, a directory, in a missing folder, or exists (unless
    ``force``)."""
    case_path = pathlib.Path(case)
    for path in files:
        if path.exists() and case_path.exists() and os.path.samefile(path, case_path):
            raise CaseError("refusing to write the result over the case file itself",
                            source="command line", where=where)
        if path.is_dir():
            raise CaseError(f'"{path}" is a directory; give a file name',
                            source="command line", where=where)
        if not path.parent.is_dir():
            raise CaseError(f'folder "{path.parent}" does not exist', source="command line",
                            where=where)
        if path.exists() and not force:
            raise CaseError(f'"{path}" exists; choose another name or add --force to replace '
                            "it", source="command line", where=where)
    mask = os.umask(0)
    os.umask(mask)
    for path, content in files.items():
        data = content.encode("utf-8") if isinstance(content, str) else content
        fd, tmp = tempfile.mkstemp(dir=path.parent, prefix=f".{path.name}.")
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
        os.chmod(tmp, 0o666 & ~mask)  # as an ordinary new file (mkstemp makes it private)
        if force:
            os.replace(tmp, path)  # one step: the old file or the new one, never half
        else:
            try:
                os.link(tmp, path)  # fails if the file appeared meanwhile
            except FileExistsError:
                raise CaseError(f'"{path}" exists; choose another name or add --force',
                                source="command line", where=where) from None
            finally:
                os.unlink(tmp)
