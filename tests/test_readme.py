"""README's two set-up commands exist, and CI runs exactly the README's test command."""

import re
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def _readme_commands() -> list[str]:
    text = (ROOT / "README.md").read_text()
    return re.findall(r"```sh\n(.+?)\n```", text)[:2]


def test_readme_opens_with_the_job_then_two_commands():
    text = (ROOT / "README.md").read_text()
    first_paragraph = text.split("\n\n")[1]
    assert "NURBS" in first_paragraph and "seam" in first_paragraph
    run, test = _readme_commands()
    assert ".venv" in run and ".venv" in test
    assert "pytest" in test


def test_ci_runs_the_readme_test_command():
    ci = (ROOT / ".ci" / "run").read_text().strip().splitlines()
    assert ci[-1].strip() == _readme_commands()[1]


def test_readme_sample_exists():
    run = _readme_commands()[0]
    sample = re.search(r"(sample_surfaces/\S+)", run).group(1)
    assert (ROOT / sample).is_file()
