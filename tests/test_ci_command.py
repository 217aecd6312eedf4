"""The CI entry point runs exactly the README's test command (project rule), and that
command installs Chromium without its recommended packages (DEVELOPERS.md, "Run")."""

import re
from pathlib import Path

ROOT = Path(__file__).parents[1]


def _readme_test_command() -> str:
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    blocks = re.findall(r"```bash\n(.*?)```", readme, re.S)
    commands = [line for block in blocks for line in block.splitlines() if "-m pytest" in line]
    assert len(commands) == 1, commands  # the one test command of "Two commands"
    return commands[0].strip()


def test_ci_runs_exactly_the_readme_test_command():
    lines = (ROOT / ".ci" / "run").read_text(encoding="utf-8").splitlines()
    commands = [line.strip() for line in lines if line.strip() and not line.startswith("#")]
    assert commands[-1] == _readme_test_command()
    assert all(c.startswith(("set ", "cd ")) for c in commands[:-1]), commands


def test_chromium_comes_without_recommended_packages():
    command = _readme_test_command()
    install = re.search(r"apt-get install ([^)]*)\)", command)
    assert install, command
    words = install.group(1).split()
    assert "--no-install-recommends" in words and "chromium" in words, words
    # the font the charts name first (charts/palette.py FONT), which the screenshots show
    assert "fonts-liberation" in words, words
