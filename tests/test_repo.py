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


def test_every_scenario_key_and_summary_key_is_documented():
    """The glossary names every scenario key (dotted) and every summary key of every layout; the
    scenario-format page has every scenario key in one of its tables."""
    from cycle.results import summary_keys
    from cycle.scenario import SCHEMA, all_keys, load_scenario

    glossary = (ROOT / "docs" / "glossary.md").read_text()
    formats = (ROOT / "docs" / "scenario-format.md").read_text()
    for key in all_keys():
        if isinstance(eval_kind(SCHEMA, key), dict) or key.startswith(("warm_recuperator", "cold_recuperator")):
            continue
        assert f"`{key}`" in glossary or key == "sweep", key
        last = key.split(".")[-1]
        assert f"`{last}`" in formats or f".{last}`" in formats, key
    for demo in sorted((ROOT / "scenarios").glob("*.yaml")):
        for key in summary_keys(load_scenario(demo)):
            generic = key
            for name in ("warm_recuperator", "cold_recuperator", "recuperator"):
                if key.startswith(name + "_") and key[len(name) + 1:] in _PER_RECUPERATOR:
                    generic = "{name}_" + key[len(name) + 1:]
                    break
            assert f"`{generic}`" in glossary or f"`{key}`" in glossary or key in glossary, key


_PER_RECUPERATOR = {"effectiveness", "critical_effectiveness", "min_approach_K", "min_approach_position",
                    "warm_end_approach_K", "cold_end_approach_K", "duty_kJ_per_kg_compressed",
                    "UA_W_per_K_per_kg_per_s", "length_m", "area_m2", "high_side_pressure_drop_bar",
                    "low_side_pressure_drop_bar", "min_reynolds_high", "min_reynolds_low", "max_velocity_m_per_s"}


def eval_kind(schema, key):
    node = schema
    for part in key.split("."):
        node = node[part]
    return node
