"""The README's Python example runs and its set-up commands name files that exist."""

from __future__ import annotations

import re
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def test_readme_python_example_runs():
    text = (ROOT / "README.md").read_text()
    blocks = re.findall(r"```python\n(.*?)```", text, flags=re.S)
    assert blocks, "README has no python example"
    for code in blocks:
        exec(compile(code, "README.md", "exec"), {})  # asserts 3wl/8 inside (handbook value)


def test_readme_has_two_setup_commands_on_bundled_case():
    text = (ROOT / "README.md").read_text()
    setup = text.split("## Set-up", 1)[1].split("## ", 1)[0]
    commands = re.findall(r"```\n(.*?)\n```", setup, flags=re.S)
    assert len(commands) == 2
    case = re.search(r"leastwork solve (\S+)", commands[0]).group(1)
    assert (ROOT / case).is_file()
    assert "pytest" in commands[1]
