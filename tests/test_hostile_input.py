"""Hostile input: a one-line error and exit status 2, never a traceback, a hang or a wrong number.

Unit strings that once crashed pint or were misread, YAML that expands or nests without end,
oversized files, odd keys, control characters in names, and sweeps too large to hold. The
documents that test the limits would be catastrophically large if expanded, so a regression
hangs or runs out of memory visibly instead of passing (no test here is timed).
"""

import json

import pytest
import yaml

from cycle import cli
from cycle.errors import ScenarioError
from cycle.scenario import (MAX_DEPTH, MAX_FILE_BYTES, MAX_VALUES, load_scenario, parse_scenario,
                            read_mapping)
from cycle.units import UnitError, parse_quantity

SCENARIO = ("name: hostile\ngas: nitrogen\nlow_pressure: 1 bar\nhigh_pressure: 200 bar\n"
            "compressor: {isothermal_efficiency: 0.6}\nrecuperator: {effectiveness: 0.9}\n")


def run(capsys, *argv):
    code = cli.main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return code, out, err


def refused(capsys, *argv, naming):
    """Run lhsim; assert exit 2, nothing on stdout and one line on stderr naming ``naming``."""
    code, out, err = run(capsys, *argv)
    assert code == 2, err
    assert out == ""
    assert err.startswith("lhsim: error: ") and err.count("\n") == 1, err
    assert "Traceback" not in err and naming in err, err
    return err


def write(tmp_path, text, name="s.yaml"):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


@pytest.fixture(params=["C", "Python"])
def loader(request, monkeypatch):
    """Run a test with PyYAML's C loader (where built) and with the pure-Python one."""
    if request.param == "C":
        if not hasattr(yaml, "CSafeLoader"):
            pytest.skip("PyYAML built without libyaml")
    else:
        monkeypatch.delattr(yaml, "CSafeLoader", raising=False)
    return request.param


# -- unit strings ---------------------------------------------------------------------------

HOSTILE_UNITS = [
    "1 bar / 0",             # pint: ZeroDivisionError
    "1 (bar",                # tokenize: TokenError
    "1 bar)",                # tokenize: TokenError
    "1 bar **",              # pint: AssertionError
    "1 __import__('os')",    # a Python expression: AssertionError
    "1 bar ** 1e400",        # an overflowing power
    "1 bar ** 2 ** 10",      # a power of a power
    "2 1 bar",               # once read as 2 bar
    "1 bar;",
    "1 (",
    "1 bar ^ -",
]


@pytest.mark.parametrize("text", HOSTILE_UNITS)
def test_a_hostile_unit_string_is_a_unit_error(text):
    with pytest.raises(UnitError) as info:
        parse_quantity(text, "pressure")
    message = str(info.value)
    assert "\n" not in message and repr(text) in message


def test_a_second_number_before_the_unit_is_refused_not_multiplied():
    with pytest.raises(UnitError, match=r"expected one number followed by a unit, got '2 1 bar'"):
        parse_quantity("2 1 bar", "pressure")
    assert parse_quantity("2 bar", "pressure") == 2e5


@pytest.mark.parametrize("text, dimension, si", [
    ("1 (bar)", "pressure", 1e5),
    ("1 bar^2 / bar", "pressure", 1e5),
    ("1 bar**-1 * bar**2", "pressure", 1e5),
    ("36 kilogram / hour", "mass_flow", 0.01),
    ("1 kg/(m^2*s) * m^2", "mass_flow", 1.0),
    ("3.6 m^3/h", "volume_flow", 1e-3),
    ("1e3 µbar", "pressure", 100.0),
])
def test_unit_expressions_of_names_powers_and_parentheses_still_read(text, dimension, si):
    # Exact unit definitions (SI brochure): the tolerance is float round-off.
    assert parse_quantity(text, dimension) == pytest.approx(si, rel=1e-12)


def test_a_long_value_is_refused_and_shown_cut_short():
    text = "1 " + "x" * 100_000
    with pytest.raises(UnitError) as info:
        parse_quantity(text, "pressure")
    message = str(info.value)
    assert "100002 characters" in message and len(message) < 200


@pytest.mark.parametrize("text", HOSTILE_UNITS)
def test_a_hostile_unit_in_a_scenario_names_its_key(capsys, tmp_path, text):
    path = write(tmp_path, SCENARIO.replace("high_pressure: 200 bar", f"high_pressure: {json.dumps(text)}"))
    refused(capsys, "run", path, naming="high_pressure: ")


@pytest.mark.parametrize("text", HOSTILE_UNITS)
def test_a_hostile_unit_in_a_sweep_names_its_key(capsys, tmp_path, text):
    path = write(tmp_path, SCENARIO + f"sweep:\n  high_pressure: [150 bar, {json.dumps(text)}]\n")
    out = tmp_path / "out.csv"
    refused(capsys, "sweep", path, "--out", out, naming="high_pressure")
    assert not out.exists()


@pytest.mark.parametrize("text", HOSTILE_UNITS)
def test_a_hostile_unit_in_between_names_the_option(capsys, tmp_path, text):
    path = write(tmp_path, SCENARIO)
    refused(capsys, "optimize", path, "--vary", "high_pressure", "--between", text, "300 bar",
            "--goal", "max-yield", naming="--between")


@pytest.mark.parametrize("text", HOSTILE_UNITS)
def test_a_hostile_unit_in_lhsim_gas_names_the_option(capsys, text):
    refused(capsys, "gas", "nitrogen", "-T", "300 K", "-p", text, naming="--pressure: ")
    refused(capsys, "gas", "nitrogen", "-T", text, "-p", "1 bar", naming="--temperature: ")


def test_a_range_of_whole_numbers_refuses_text(capsys, tmp_path):
    path = write(tmp_path, SCENARIO + "sweep:\n  recuperator.zones: {from: abc, to: 10, steps: 3}\n")
    refused(capsys, "sweep", path, "--out", tmp_path / "out.csv", naming="sweep.recuperator.zones: ")


# -- YAML that expands, nests or grows without end -----------------------------------------------

def laughs(levels=12):
    """Ten values, each level ten aliases of the one before: 10**levels values once expanded."""
    lines = ['l0: &l0 ["lol", "lol", "lol", "lol", "lol", "lol", "lol", "lol", "lol", "lol"]']
    for k in range(1, levels):
        lines.append(f"l{k}: &l{k} [" + ", ".join([f"*l{k - 1}"] * 10) + "]")
    return "\n".join(lines) + "\n"


def test_aliases_that_expand_beyond_the_limit_are_refused_unexpanded(capsys, tmp_path, loader):
    # 10**12 values as a pressure: a message that showed the value, or a check that walked it,
    # would never finish.
    text = SCENARIO.replace("low_pressure: 1 bar\n", "") + laughs() + "low_pressure: *l11\n"
    path = write(tmp_path, text)
    err = refused(capsys, "run", path, naming=f"more than {MAX_VALUES} values once its aliases are expanded")
    assert "the value at line 11 holds" in err  # l5, 10**6 values, is the first over the limit


def test_aliases_within_the_limit_are_accepted():
    # warm and cold recuperators from one anchored section (documented YAML use)
    text = SCENARIO.replace("recuperator: {effectiveness: 0.9}\n", "") + (
        "precooling: {temperature: 200 K, refrigerator_cop: 1.5}\n"
        "warm_recuperator: &r {effectiveness: 0.95, zones: 20}\ncold_recuperator: *r\n")
    sc = parse_scenario(yaml.safe_load(text))
    assert sc.warm_recuperator == sc.cold_recuperator and sc.cold_recuperator.zones == 20


def test_a_value_that_holds_itself_is_refused(capsys, tmp_path, loader):
    path = write(tmp_path, SCENARIO + "precooling: &p {temperature: *p}\n")
    refused(capsys, "run", path, naming="contains itself through an alias")


@pytest.mark.parametrize("depth", [MAX_DEPTH + 1, 1000, 100_000])
def test_nesting_beyond_the_limit_is_refused(capsys, tmp_path, loader, depth):
    path = write(tmp_path, SCENARIO.replace("name: hostile", "name: " + "[" * depth + "]" * depth))
    refused(capsys, "run", path, naming=f"more than {MAX_DEPTH} levels deep")


def test_nesting_at_the_limit_is_read(tmp_path, loader):
    data = read_mapping(write(tmp_path, "a: " + "[" * (MAX_DEPTH - 1) + "]" * (MAX_DEPTH - 1) + "\n"))
    depth, node = 1, data["a"]
    while node:
        depth, node = depth + 1, node[0]
    assert depth == MAX_DEPTH - 1


def test_a_file_over_the_size_limit_is_refused_with_its_size(capsys, tmp_path):
    path = write(tmp_path, SCENARIO + "# " + "x" * MAX_FILE_BYTES + "\n")
    size = path.stat().st_size
    refused(capsys, "run", path, naming=f"is too large: {size} bytes, at most {MAX_FILE_BYTES} bytes")


def test_a_file_at_the_size_limit_is_read(tmp_path):
    padding = "#" * (MAX_FILE_BYTES - len(SCENARIO) - 1) + "\n"
    path = write(tmp_path, SCENARIO + padding)
    assert path.stat().st_size == MAX_FILE_BYTES
    assert load_scenario(path).name == "hostile"


def test_the_c_loader_is_used_where_built(monkeypatch, tmp_path):
    if not hasattr(yaml, "CSafeLoader"):
        pytest.skip("PyYAML built without libyaml")
    made = []
    original = yaml.CSafeLoader.__init__

    def counting(self, stream):
        made.append(type(self).__mro__)
        original(self, stream)

    monkeypatch.setattr(yaml.CSafeLoader, "__init__", counting)
    read_mapping(write(tmp_path, SCENARIO))
    assert len(made) == 1 and yaml.CSafeLoader in made[0]


def test_lhsim_run_reads_the_scenario_file_once(capsys, monkeypatch, tmp_path):
    import cycle.scenario

    calls = []
    original = cycle.scenario.read_mapping
    monkeypatch.setattr(cycle.scenario, "read_mapping", lambda path: calls.append(path) or original(path))
    path = write(tmp_path, SCENARIO + "sweep:\n  high_pressure: [150 bar, 200 bar]\n")
    code, out, err = run(capsys, "run", path, "--json")
    assert code == 0 and json.loads(out)["scenario"]["high_pressure"] == 200e5
    assert "without its sweep section" in err
    assert calls == [str(path)]


# -- keys, names and characters ---------------------------------------------------------------

def test_an_unhashable_key_is_refused(capsys, tmp_path, loader):
    path = write(tmp_path, SCENARIO + "? [a]\n: 1\n")
    refused(capsys, "run", path, naming="line 7: a key must be a name, got the list ['a']")


def test_merge_keys_are_yaml_and_are_accepted(tmp_path, loader):
    text = SCENARIO.replace("recuperator: {effectiveness: 0.9}\n", "") + (
        "precooling: {temperature: 200 K, refrigerator_cop: 1.5}\n"
        "warm_recuperator: &r {effectiveness: 0.95, zones: 20}\n"
        "cold_recuperator:\n  <<: *r\n  effectiveness: 0.9\n")
    sc = load_scenario(write(tmp_path, text))
    assert sc.warm_recuperator.effectiveness == 0.95
    assert sc.cold_recuperator.effectiveness == 0.9 and sc.cold_recuperator.zones == 20  # merged


def test_a_key_given_twice_beside_a_merge_is_still_refused(capsys, tmp_path, loader):
    text = SCENARIO.replace("recuperator: {effectiveness: 0.9}\n", "") + (
        "recuperator:\n  <<: {zones: 20}\n  effectiveness: 0.9\n  effectiveness: 0.8\n")
    refused(capsys, "run", write(tmp_path, text), naming="key effectiveness is given twice (line 9)")


def test_a_nul_byte_is_refused_with_its_place(capsys, tmp_path):
    path = tmp_path / "nul.yaml"
    path.write_bytes(SCENARIO.replace("hostile", "host\0ile").encode())
    refused(capsys, "run", path, naming="line 1, column 11 holds the control character U+0000")


def test_an_integer_too_long_to_convert_is_refused(capsys, tmp_path):
    path = write(tmp_path, SCENARIO.replace("low_pressure: 1 bar", "low_pressure: " + "1" * 5000))
    refused(capsys, "run", path, naming="holds a value that cannot be read")


def test_control_characters_in_the_name_are_escaped_in_text_and_json(capsys, tmp_path):
    # an escape sequence (colour red), a bidirectional override, a tab, a NUL and a bell
    raw = "plant\\e[31m red\\u202e\\t\\0\\a"
    path = write(tmp_path, SCENARIO.replace("name: hostile", f'name: "{raw}"'))
    code, out, _ = run(capsys, "run", path)
    assert code == 0
    assert "plant\\x1b[31m red\\u202e\\x09\\x00\\x07" in out
    assert not any(ch in out for ch in "\x1b\u202e\0\a")
    code, out, _ = run(capsys, "run", path, "--json")
    assert code == 0
    assert json.loads(out)["scenario"]["name"] == "plant\\x1b[31m red\\u202e\\x09\\x00\\x07"


def test_a_lone_surrogate_in_the_name_never_reaches_the_output(capsys, tmp_path, loader):
    path = write(tmp_path, SCENARIO.replace("name: hostile", 'name: "half \\ud800 a pair"'))
    code, out, err = run(capsys, "run", path)
    if loader == "C":  # libyaml refuses the escape itself
        assert code == 2 and err.count("\n") == 1 and "not valid YAML at line 1" in err
        return
    assert code == 0
    out.encode("utf-8")  # strict: a lone surrogate would raise
    assert "half \\ud800 a pair" in out
    assert parse_scenario(yaml.safe_load(SCENARIO)).name == "hostile"
    assert parse_scenario(dict(yaml.safe_load(SCENARIO), name="a\ud800b")).name == "a\\ud800b"


def test_a_huge_value_of_the_wrong_kind_is_shown_cut_short():
    data = yaml.safe_load(SCENARIO)
    data["compressor"] = {"isothermal_efficiency": [list(range(1000))] * 1000}
    with pytest.raises(ScenarioError) as info:
        parse_scenario(data)
    message = str(info.value)
    assert message.startswith("compressor.isothermal_efficiency must be a number, got [[0, 1, 2")
    assert len(message) < 150


# -- sweeps too large to hold ----------------------------------------------------------------

def test_a_sweep_beyond_the_point_limit_is_refused_with_its_count(capsys, tmp_path):
    # 10**15 points: expanding them first would exhaust any memory
    sweep = ("sweep:\n  high_pressure: {from: 100 bar, to: 300 bar, steps: 100000}\n"
             "  ambient_temperature: {from: 280 K, to: 310 K, steps: 100000}\n"
             "  recuperator.effectiveness: {from: 0.9, to: 0.99, steps: 100000}\n")
    out = tmp_path / "out.csv"
    refused(capsys, "sweep", write(tmp_path, SCENARIO + sweep), "--out", out,
            naming="sweep has 1000000000000000 points (100000 high_pressure x 100000 ambient_temperature x "
                   "100000 recuperator.effectiveness), more than the limit of 1000000")
    assert not out.exists()


def test_the_point_limit_counts_zip_sweeps_by_their_common_length():
    from cycle.sweep import expand

    data = yaml.safe_load(SCENARIO)
    data["sweep"] = {"mode": "zip", "high_pressure": ["150 bar", "200 bar", "250 bar"],
                     "recuperator.effectiveness": [0.9, 0.92, 0.94]}
    assert len(expand(data, max_points=3)[1]) == 3
    with pytest.raises(ScenarioError, match=r"^sweep has 3 points \(zip\), more than the limit of 2;"):
        expand(data, max_points=2)


def test_the_point_limit_can_be_raised():
    from cycle.sweep import expand

    data = yaml.safe_load(SCENARIO)
    data["sweep"] = {"high_pressure": {"from": "150 bar", "to": "250 bar", "steps": 3},
                     "recuperator.effectiveness": [0.9, 0.95]}
    with pytest.raises(ScenarioError, match=r"^sweep has 6 points \(3 high_pressure x 2 recuperator"):
        expand(data, max_points=5)
    keys, points = expand(data, max_points=6)
    assert keys == ["high_pressure", "recuperator.effectiveness"] and len(points) == 6
    assert points[5][0] == {"high_pressure": 250e5, "recuperator.effectiveness": 0.95}
    assert "sweep" not in points[5][1] and points[5][1]["recuperator"] == {"effectiveness": 0.95}


def test_lhsim_sweep_max_points_raises_or_lowers_the_limit(capsys, tmp_path):
    sweep = "sweep:\n  high_pressure: [150 bar, 250 bar]\n  recuperator.effectiveness: [0.9]\n"
    path = write(tmp_path, SCENARIO + sweep)
    out = tmp_path / "out.csv"
    refused(capsys, "sweep", path, "--out", out, "--max-points", 1,
            naming="sweep has 2 points (2 high_pressure x 1 recuperator.effectiveness), more than the limit of 1")
    assert not out.exists()
    refused(capsys, "sweep", path, "--out", out, "--max-points", 0, naming="--max-points must be 1 or more, got 0")
    code, _, err = run(capsys, "sweep", path, "--out", out, "--max-points", 2, "--workers", 1)
    assert code == 0 and f"2 points in {out}" in err
