"""The repository's promises to a new user: the README's commands, and CI running them."""

import pathlib
import re

ROOT = pathlib.Path(__file__).resolve().parents[1]


def readme_commands():
    text = (ROOT / "README.md").read_text()
    quick = text.split("## Quick start", 1)[1].split("\n## ", 1)[0]
    return re.findall(r"```sh\n(.*?)\n```", quick, flags=re.S)


def test_quick_start_is_exactly_two_commands_and_ci_runs_the_test_one():
    commands = readme_commands()
    assert len(commands) == 2 and all("\n" not in c for c in commands)
    run_demo, run_tests = commands
    assert "lhsim run scenarios/nitrogen-bench.yaml" in run_demo
    assert "pytest" in run_tests
    assert run_tests in (ROOT / ".ci" / "run").read_text()


def test_readme_carries_the_cautions():
    text = (ROOT / "README.md").read_text().lower()
    for word in ("high pressure", "cryogenic", "oxygen deficiency", "oxygen enrichment", "flammable", "local codes"):
        assert word in text


def test_images_the_docs_show_exist():
    for page in [ROOT / "README.md", *sorted((ROOT / "docs").glob("*.md"))]:
        for target in re.findall(r"!\[[^\]]*\]\(([^)]+)\)", page.read_text()):
            assert (page.parent / target).exists(), f"{page.name} shows missing {target}"
