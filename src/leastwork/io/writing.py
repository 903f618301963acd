"""Writing result files without ever losing what the user wrote (the command line's only
file output): every target is checked before anything is written; an existing file is
replaced only when asked (--force), and then in one step; the case file never.

Only regular files are written or replaced. A target that exists and is anything else (a
folder, a named pipe, a device, a socket, a symbolic link to one of these or to nothing)
is refused, even with --force, and left as it was. A symbolic link to a regular file is
followed: with --force the file it points to is replaced (in one step, in its own folder)
and the link stays; without --force it counts as an existing file.
"""

from __future__ import annotations

import os
import pathlib
import stat
import tempfile

from ..errors import CaseError
from ..plaintext import ECHO_LIMIT, literal

__all__ = ["write_files"]


def _kind(mode: int) -> str:
    """What a non-regular file is, in plain words."""
    if stat.S_ISFIFO(mode):
        return "a named pipe (FIFO)"
    if stat.S_ISCHR(mode) or stat.S_ISBLK(mode):
        return "a device"
    if stat.S_ISSOCK(mode):
        return "a socket"
    return "not a regular file"


def _target(path: pathlib.Path, *, force: bool, case_path: pathlib.Path,
            where: str) -> pathlib.Path:
    """The regular file to write for ``path``: ``path`` itself, or the file a symbolic link
    at ``path`` points to. Raises CaseError when ``path`` may not be written."""

    def refuse(message: str) -> CaseError:
        return CaseError(message, source="command line", where=where)

    link = path.is_symlink()
    if not link and not path.exists():
        if not path.parent.is_dir():
            raise refuse(f'folder "{path.parent}" does not exist')
        return path
    try:
        mode = path.stat().st_mode  # follows a symbolic link
    except OSError:
        raise refuse(f'"{path}" is a symbolic link to nothing; remove it or give another '
                     "name") from None
    if case_path.exists() and os.path.samefile(path, case_path):
        raise refuse("refusing to write the result over the case file itself")
    linked = " a symbolic link to" if link else ""
    if stat.S_ISDIR(mode):
        raise refuse(f'"{path}" is{linked} a directory; give a file name')
    if not stat.S_ISREG(mode):
        what = _kind(mode)
        what = what if what.startswith("a ") else "something that is " + what
        raise refuse(f'"{path}" is{linked} {what}; only regular files are written or '
                     "replaced, even with --force")
    if not force:
        raise refuse(f'"{path}" exists; choose another name or add --force to replace it')
    return pathlib.Path(os.path.realpath(path)) if link else path


def write_files(files: dict[pathlib.Path, str | bytes], *, force: bool, case: str,
                where: str = "--output") -> None:
    """Write ``files`` (path -> text or bytes). Raises CaseError, before writing anything,
    if a target is the case file, a directory or anything but a regular file (see the
    module's description), in a missing folder, or exists (unless ``force``)."""
    case_path = pathlib.Path(case)
    targets = {}
    for path in files:
        try:
            targets[path] = _target(pathlib.Path(path), force=force, case_path=case_path,
                                    where=where)
        except OSError as exc:  # a name too long for the file system, a folder not readable
            raise CaseError(f'cannot write "{literal(str(path), ECHO_LIMIT)}": '
                            f"{exc.strerror or exc}", source="command line", where=where) from None
    mask = os.umask(0)
    os.umask(mask)
    for path, content in files.items():
        data = content.encode("utf-8") if isinstance(content, str) else content
        try:
            _write_one(targets[path], data, force=force, mode=0o666 & ~mask, where=where)
        except OSError as exc:
            raise CaseError(f'cannot write "{path}": {exc.strerror or exc}',
                            source="command line", where=where) from None


def _write_one(target: pathlib.Path, data: bytes, *, force: bool, mode: int,
               where: str) -> None:
    """Write ``data`` to ``target`` through a temporary file in the same folder: replaced
    in one step with ``force``, else linked into place only if nothing appeared there."""
    fd, tmp = tempfile.mkstemp(dir=target.parent, prefix=f".{target.name}.")
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
        os.chmod(tmp, mode)  # as an ordinary new file (mkstemp makes it private)
        if force:
            if target.is_symlink() or (target.exists() and not target.is_file()):
                raise CaseError(f'"{target}" changed while writing; nothing was replaced',
                                source="command line", where=where)
            os.replace(tmp, target)  # one step: the old file or the new one, never half
            tmp = None
        else:
            try:
                try:
                    os.link(tmp, target)  # fails if the file appeared meanwhile
                except FileExistsError:
                    raise
                except OSError:  # a file system without hard links: create it exclusively
                    with open(target, "xb") as fh:
                        fh.write(data)
            except FileExistsError:
                raise CaseError(f'"{target}" exists; choose another name or add --force',
                                source="command line", where=where) from None
    finally:
        if tmp is not None:
            os.unlink(tmp)
