"""A standing fuzz test: seeded, a few hundred hostile inputs through the command line.

Every input must end in exit 0 (solved), 2 (invalid input, one line) or 3 (no liquid, one line);
never a traceback, and nothing written outside the folder the command was pointed at.  The
inputs mutate the demo scenarios: values replaced by hostile strings and numbers, keys dropped
or doubled, sections replaced by scalars, lists and deep nesting, bytes that are not text.
"""

import os
import pathlib
import random

import pytest
import yaml

from cycle import cli

ROOT = pathlib.Path(__file__).resolve().parents[1]
DEMOS = sorted(p for p in (ROOT / "scenarios").glob("*.yaml") if "study" not in p.name)

HOSTILE = [
    "1 bar / 0", "1 (bar", "1 bar)", "1 bar **", "1 __import__('os')", "1 bar ** 1e400", "2 1 bar", "1e400 bar",
    "-5 bar", "0 K", "nan", "inf", "-inf", "", " ", "bar", "1 parsec", "32 C", "80 F", "m3/h", "1 psig", "1 psia",
    "1e308 kg/s", "1e-308 W/K", "\x00", "\x1b[31mred", "\ud800", "Ω", "10 L/h", "300 K", "200 bar", "0.5", "1.5",
    "-1", 0, -1, 1e308, -1e308, float("nan"), float("inf"), True, None, [], {}, [1, 2], {"a": 1}, 10 ** 400,
    "1" * 5000, "{{}}", "!!python/object:os.system", "& anchor", "*alias",
]


def _scaled(value, rng):
    """``value`` with its number multiplied by a factor from 1e-3 to 1e3 (its unit kept)."""
    factor = 10 ** rng.uniform(-3, 3)
    if isinstance(value, (int, float)):
        return value * factor
    number, _, unit = value.partition(" ")
    try:
        return f"{float(number) * factor:.6g} {unit}".strip()
    except ValueError:
        return value


def _mutate(data, rng):
    """A copy of ``data`` with one to three hostile changes."""
    data = yaml.safe_load(yaml.safe_dump(data))
    for _ in range(rng.randint(1, 3)):
        paths = []
        for key, value in data.items():
            paths.append((key,))
            if isinstance(value, dict):
                paths += [(key, sub) for sub in value]
        path = rng.choice(paths)
        parent = data if len(path) == 1 else data[path[0]]
        if not isinstance(parent, dict):
            continue
        action = rng.random()
        value = parent.get(path[-1])
        if action < 0.4 and isinstance(value, (int, float, str)) and not isinstance(value, bool):
            parent[path[-1]] = _scaled(value, rng)  # a plausible-looking value, often far off
        elif action < 0.7:
            parent[path[-1]] = rng.choice(HOSTILE)
        elif action < 0.85:
            parent.pop(path[-1], None)
        else:
            nested = rng.choice(HOSTILE)
            for _ in range(rng.choice([1, 5, 30])):
                nested = {"x": nested}
            parent[path[-1]] = nested
    return data


def _dump(data):
    try:
        return yaml.safe_dump(data, allow_unicode=True)
    except (yaml.YAMLError, UnicodeEncodeError):
        return yaml.safe_dump(data, allow_unicode=False)


def _snapshot(folder):
    return {p: p.stat().st_mtime_ns for p in folder.rglob("*")}


def _cases(n, seed):
    rng = random.Random(seed)
    bases = [yaml.safe_load(p.read_text(encoding="utf-8")) for p in DEMOS]
    return [_mutate(rng.choice(bases), rng) for _ in range(n)]


@pytest.mark.parametrize("block", range(6))
def test_hostile_scenarios_end_in_0_2_or_3_without_a_traceback(block, tmp_path, capsys):
    work = tmp_path / "work"
    work.mkdir()
    outside = tmp_path / "outside.txt"
    outside.write_text("untouched")
    before = _snapshot(ROOT / "scenarios")
    for k, data in enumerate(_cases(40, seed=1000 + block)):
        path = work / f"case{k}.yaml"
        path.write_text(_dump(data), encoding="utf-8", errors="surrogatepass")
        try:
            code = cli.main(["run", str(path)])
        except SystemExit as stop:  # argparse: never expected here
            code = stop.code
        out, err = capsys.readouterr()
        assert code in (0, 2, 3), (code, data, err)
        assert "Traceback" not in err and "Traceback" not in out, data
        if code in (2, 3):
            lines = [line for line in err.splitlines() if line.startswith("lhsim: error:")]
            assert len(lines) == 1, (data, err)
            assert all(ch == "\n" or ch == "\t" or ord(ch) >= 32 for ch in err), "control characters in the message"
    assert outside.read_text() == "untouched"
    assert _snapshot(ROOT / "scenarios") == before
    assert sorted(p.name for p in work.iterdir()) == sorted(f"case{k}.yaml" for k in range(40))


@pytest.mark.parametrize("raw", [b"\xff\xfe\x00garbage", b"gas: nitrogen\x00\n", b"- a\n- b\n", b"a: [", b"",
                                 b"? [a]\n: 1\n", b"a: &x [*x]\n", b"gas: !!python/object/apply:os.system [ls]\n"])
def test_bytes_that_are_not_a_scenario_end_in_one_line(raw, tmp_path, capsys):
    path = tmp_path / "raw.yaml"
    path.write_bytes(raw)
    assert cli.main(["run", str(path)]) == 2
    err = capsys.readouterr().err
    assert err.startswith("lhsim: error:") and len(err.strip().splitlines()) == 1 and "Traceback" not in err


def test_hostile_sweep_values_end_in_0_or_2_and_touch_only_the_output(tmp_path, capsys):
    rng = random.Random(7)
    base = yaml.safe_load((ROOT / "scenarios" / "nitrogen-bench.yaml").read_text(encoding="utf-8"))
    for k in range(12):
        values = [rng.choice(HOSTILE) for _ in range(rng.randint(1, 3))]
        data = dict(base, sweep={rng.choice(["high_pressure", "recuperator.effectiveness", "gas",
                                             "production.liquid_rate"]): values})
        path = tmp_path / f"s{k}.yaml"
        path.write_text(_dump(data), encoding="utf-8", errors="surrogatepass")
        out = tmp_path / "out" / f"r{k}.csv"
        out.parent.mkdir(exist_ok=True)
        before = set(os.listdir(tmp_path))
        code = cli.main(["sweep", str(path), "--out", str(out), "--workers", "1"])
        _, err = capsys.readouterr()
        assert code in (0, 2), (code, data, err)
        assert "Traceback" not in err
        assert set(os.listdir(tmp_path)) == before  # nothing new beside the scenario files
