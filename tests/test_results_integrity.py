"""A results file is never silently wrong and never lost: re-runs, resumes, kills at every
write step, locks, links, file-system errors, orphaned workers, Ctrl-C and Dask addresses."""

import errno
import json
import os
import signal
import socket
import subprocess
import sys
import time

import pytest
import yaml

from cycle import cli
from cycle import sweep as sweep_module
from cycle.errors import ScenarioError
from cycle.sweep import ResultsFile, run_sweep

BASE = {
    "gas": "nitrogen", "low_pressure": "1.05 bar", "high_pressure": "200 bar",
    "compressor": {"isothermal_efficiency": 0.6},
    "recuperator": {"effectiveness": 0.97, "zones": 10},
    "production": {"liquid_rate": "10 L/h"}, "heat_leak": "5 W",
}
# Four points, two that make liquid and two (hydrogen) that do not: numbers and empty cells.
SWEEP = dict(BASE, sweep={"high_pressure": ["100 bar", "200 bar"], "gas": ["nitrogen", "hydrogen"]})
FORMATS = ["csv", "parquet"]


@pytest.fixture(scope="module")
def reference(tmp_path_factory):
    """The uninterrupted file of SWEEP in each format, as bytes."""
    folder = tmp_path_factory.mktemp("reference")
    out = {}
    for fmt in FORMATS:
        run_sweep(SWEEP, folder / f"r.{fmt}", workers=1)
        out[fmt] = (folder / f"r.{fmt}").read_bytes()
    return out


def leftovers(folder, keep):
    return sorted(p.name for p in folder.iterdir() if p.name not in keep)


def error_of(capsys, argv):
    code = cli.main(argv)
    err = capsys.readouterr().err
    return code, err


def one_line_error(code, err):
    assert code == 2, err
    assert err.startswith("lhsim: error: ") and err.count("\n") == 1 and "Traceback" not in err, err


# -- 1. a re-run of a finished sweep leaves the file as it is -------------------------------

@pytest.mark.parametrize("fmt", FORMATS)
def test_a_rerun_of_a_finished_sweep_leaves_the_file_byte_identical(tmp_path, reference, fmt):
    out = tmp_path / f"r.{fmt}"
    run_sweep(SWEEP, out, workers=1)
    assert out.read_bytes() == reference[fmt]
    for _ in range(2):
        assert run_sweep(SWEEP, out, workers=1)["computed"] == 0
        assert out.read_bytes() == reference[fmt]
    assert leftovers(tmp_path, {out.name}) == [f"r.{fmt}.lhsim.json", f"r.{fmt}.lhsim.lock"]


def test_parquet_columns_have_their_types_and_empty_messages_stay_empty(tmp_path):
    import pyarrow.parquet as pq

    out = tmp_path / "r.parquet"
    run_sweep(SWEEP, out, workers=1)
    run_sweep(SWEEP, out, workers=1)  # the re-run that used to turn numbers into text
    table = pq.read_table(out)
    types = {name: str(table.schema.field(name).type) for name in table.column_names}
    assert types["point"] == "int64" and types["gas"] == types["status"] == types["message"] == "string"
    assert types["high_pressure_bar"] == types["liquid_yield"] == "double"
    rows = table.to_pylist()
    ok = [r for r in rows if r["status"] == "ok"]
    assert [r["message"] for r in ok] == ["", ""]  # empty text, not 'nan'
    assert all(isinstance(r["liquid_yield"], float) for r in ok)
    assert all(r["liquid_yield"] is None for r in rows if r["status"] == "no-liquid")


# -- 1. a SIGKILL at every step of the writing ------------------------------------------------

def _run_killed_at(step, out):
    """Run SWEEP into ``out`` in a forked child that SIGKILLs itself just before its
    ``step``-th file-system step (write, fsync, truncate, rename, unlink); True if it was
    killed, False if it finished first."""
    pid = os.fork()
    if pid == 0:  # the child: count the steps, die at the chosen one
        try:
            count = [0]

            def dying(real):
                def step_then(*args, **kwargs):
                    count[0] += 1
                    if count[0] == step:
                        os.kill(os.getpid(), signal.SIGKILL)
                    return real(*args, **kwargs)
                return step_then

            for name in ("write", "fsync", "ftruncate", "replace", "unlink"):
                setattr(os, name, dying(getattr(os, name)))
            run_sweep(SWEEP, out, workers=1, batch_size=1, progress=False)
            os._exit(0)
        except BaseException:
            os._exit(3)
    deadline = time.monotonic() + 60
    while True:
        done, status = os.waitpid(pid, os.WNOHANG)
        if done:
            break
        if time.monotonic() > deadline:
            os.kill(pid, signal.SIGKILL)
            os.waitpid(pid, 0)
            pytest.fail(f"the sweep killed at step {step} did not end within 60 s")
        time.sleep(0.01)
    if os.WIFSIGNALED(status):
        assert os.WTERMSIG(status) == signal.SIGKILL
        return True
    assert os.WEXITSTATUS(status) == 0, f"the sweep to be killed at step {step} failed"
    return False


@pytest.mark.parametrize("fmt", FORMATS)
def test_a_sigkill_at_every_write_step_then_a_rerun_gives_the_uninterrupted_file(tmp_path, reference, fmt):
    steps = 0
    for step in range(1, 80):
        folder = tmp_path / f"k{step}"
        folder.mkdir()
        out = folder / f"r.{fmt}"
        if not _run_killed_at(step, out):
            break
        steps += 1
        run_sweep(SWEEP, out, workers=1)  # resume after the kill
        assert out.read_bytes() == reference[fmt], f"killed at step {step}"
        assert leftovers(folder, {out.name}) == [f"r.{fmt}.lhsim.json", f"r.{fmt}.lhsim.lock"], f"step {step}"
        assert run_sweep(SWEEP, out, workers=1)["computed"] == 0 and out.read_bytes() == reference[fmt]
    else:
        pytest.fail("the sweep never finished")
    assert steps > 10  # every batch, the journal, the Parquet copy and the sidecar were cut


# -- 2. a resumed file is checked row by row ---------------------------------------------------

def _finished_then_edited(tmp_path, edit):
    out = tmp_path / "r.csv"
    run_sweep(SWEEP, out, workers=1)
    lines = out.read_text().splitlines(keepends=True)
    out.write_text("".join(edit(lines)))
    return out


@pytest.mark.parametrize("edit, says", [
    (lambda ls: ls[:2] + [ls[2].replace("100.0,", "150.0,", 1)] + ls[3:],
     "line 3 (point 1) does not belong to this sweep: high_pressure_bar is '150.0', the point has '100.0'"),
    (lambda ls: ls[:2] + [ls[2].replace("hydrogen", "argon", 1)] + ls[3:],
     "line 3 (point 1) does not belong to this sweep: gas is 'argon', the point has 'hydrogen'"),
    (lambda ls: ls + [ls[1]], "line 6 (point 0) does not belong to this sweep: point 0 is there twice (also "),
    (lambda ls: ls + ["9" + ls[1][1:]], "line 6 does not belong to this sweep: point '9' is not a point index of "
                                       "this sweep (0 to 3)"),
    (lambda ls: ls[:1] + ["x" + ls[1][1:]] + ls[2:], "line 2 does not belong to this sweep: point 'x' is not"),
    (lambda ls: ls[:1] + ["-1" + ls[1][1:]] + ls[2:], "point '-1' is not a point index"),
    (lambda ls: ls[:1] + [ls[1].replace(",ok,", ",done,")] + ls[2:], "status 'done' is not one of ok, no-liquid"),
    (lambda ls: ls[:1] + [ls[1].replace(",ok,,0.", ",ok,,zero")] + ls[2:], "liquid_yield is 'zero"),
    (lambda ls: ls[:1] + [ls[1].replace(",ok,,0.", ",ok,,nan")] + ls[2:], "not a finite number"),
    (lambda ls: ls[:2] + [ls[2].replace('",', '",0.5', 1)] + ls[3:],
     "a point with status no-liquid has no liquid_yield, got '0.5'"),
    (lambda ls: ls[:1] + [ls[1].rstrip("\n") + ",7\n"] + ls[2:], "line 2 does not belong to this sweep: it has"),
])
def test_resume_refuses_a_row_that_is_not_its_points(tmp_path, capsys, edit, says):
    out = _finished_then_edited(tmp_path, edit)
    before = out.read_bytes()
    with pytest.raises(ScenarioError) as info:
        run_sweep(SWEEP, out, workers=1)
    assert says in str(info.value) and "\n" not in str(info.value)
    assert str(out) in str(info.value) and "--overwrite" in str(info.value)
    assert out.read_bytes() == before  # nothing lost, nothing rewritten
    scenario = tmp_path / "s.yaml"
    scenario.write_text(yaml.safe_dump(SWEEP, sort_keys=False))
    one_line_error(*error_of(capsys, ["sweep", str(scenario), "--out", str(out), "--workers", "1"]))
    assert run_sweep(SWEEP, out, workers=1, overwrite=True)["computed"] == 4


def test_a_second_writer_is_refused_at_once_naming_the_file(tmp_path, capsys):
    from cycle.sweep import column_dimensions, columns_for, expand, fingerprint, validate

    out = tmp_path / "r.csv"
    keys, points = expand(SWEEP)
    columns = columns_for(keys, validate(keys, points), column_dimensions(keys, points))
    first = ResultsFile(out, columns, fingerprint(SWEEP), len(points))
    scenario = tmp_path / "s.yaml"
    scenario.write_text(yaml.safe_dump(SWEEP, sort_keys=False))
    try:
        for extra in ([], ["--overwrite"]):
            code, err = error_of(capsys, ["sweep", str(scenario), "--out", str(out), "--workers", "1"] + extra)
            one_line_error(code, err)
            assert f"{out} is being written by another lhsim sweep" in err
        assert out.read_text().count("\n") == 1  # the first writer's file: its header only, untouched
    finally:
        first.close()
    assert run_sweep(SWEEP, out, workers=1)["computed"] == 4  # the lock went with the first writer


# -- 3. links ------------------------------------------------------------------------------------

@pytest.mark.parametrize("fmt", FORMATS)
def test_links_beside_the_results_never_write_through(tmp_path, reference, fmt):
    victim = tmp_path / "victim.txt"
    victim.write_text("precious\n")
    out = tmp_path / f"r.{fmt}"
    # Links at every fixed name an earlier lhsim wrote a temporary file to.
    for name in (f"r.{fmt}.tmp", f"r.{fmt}.journal.csv.tmp", f"r.{fmt}.lhsim.json.tmp"):
        (tmp_path / name).symlink_to(victim)
    run_sweep(SWEEP, out, workers=1)
    assert victim.read_text() == "precious\n" and out.read_bytes() == reference[fmt]
    # A link at the sidecar's name, or at the journal's, is refused, not followed.
    sidecar = tmp_path / f"r.{fmt}.lhsim.json"
    sidecar.unlink()
    sidecar.symlink_to(victim)
    with pytest.raises(ScenarioError, match="is a symbolic link; lhsim writes only files it makes itself"):
        run_sweep(SWEEP, out, workers=1, overwrite=True)
    assert victim.read_text() == "precious\n"
    if fmt == "parquet":
        fresh = tmp_path / "p.parquet"
        (tmp_path / "p.parquet.journal.csv").symlink_to(victim)
        with pytest.raises(ScenarioError, match="p.parquet.journal.csv is a symbolic link"):
            run_sweep(SWEEP, fresh, workers=1, overwrite=True)
        assert victim.read_text() == "precious\n" and not fresh.exists()


def test_a_results_path_linked_to_an_unrelated_file_is_refused(tmp_path, reference, capsys):
    victim = tmp_path / "notes.csv"
    victim.write_text("a,b\n1,2\n")
    link = tmp_path / "r.csv"
    link.symlink_to(victim)
    scenario = tmp_path / "s.yaml"
    scenario.write_text(yaml.safe_dump(SWEEP, sort_keys=False))
    for extra in ([], ["--overwrite"]):
        code, err = error_of(capsys, ["sweep", str(scenario), "--out", str(link), "--workers", "1"] + extra)
        one_line_error(code, err)
        assert f"--out {link} is a symbolic link to {victim}, which is not an lhsim results file" in err
    assert victim.read_text() == "a,b\n1,2\n"
    # A link to a results file of lhsim's is that file: resumed beside its target.
    (tmp_path / "runs").mkdir()
    real = tmp_path / "runs" / "r.csv"
    run_sweep(SWEEP, real, workers=1)
    alias = tmp_path / "alias.csv"
    alias.symlink_to(real)
    assert run_sweep(SWEEP, alias, workers=1)["computed"] == 0
    assert alias.is_symlink() and real.read_bytes() == reference["csv"]


# -- 6. file-system errors are input errors --------------------------------------------------------

def test_output_places_that_cannot_take_a_results_file(tmp_path, capsys):
    scenario = tmp_path / "s.yaml"
    scenario.write_text(yaml.safe_dump(SWEEP, sort_keys=False))
    folder = tmp_path / "taken.csv"
    folder.mkdir()
    cases = [
        (folder, "is a folder"),
        (tmp_path / "missing" / "r.csv", "does not exist; lhsim does not make folders"),
        (scenario / "r.csv", "is not a folder"),
        ("/proc/lhsim-test.csv", "cannot make files in /proc"),
        ("/sys/lhsim-test.csv", "cannot make files in /sys"),
    ]
    for out, says in cases:
        code, err = error_of(capsys, ["sweep", str(scenario), "--out", str(out), "--workers", "1"])
        one_line_error(code, err)
        assert str(out) in err and says in err, err
    assert not (tmp_path / "missing").exists() and not os.path.exists("/proc/lhsim-test.csv")


@pytest.mark.parametrize("fmt", FORMATS)
def test_a_full_disk_stops_the_sweep_in_one_line_and_loses_nothing(tmp_path, capsys, monkeypatch, reference, fmt):
    out = tmp_path / f"r.{fmt}"
    real = sweep_module._append
    calls = []

    def full(path, data):
        calls.append(path)
        if len(calls) > 1:
            raise OSError(errno.ENOSPC, os.strerror(errno.ENOSPC))
        return real(path, data)

    monkeypatch.setattr(sweep_module, "_append", full)
    scenario = tmp_path / "s.yaml"
    scenario.write_text(yaml.safe_dump(SWEEP, sort_keys=False))
    code, err = error_of(capsys, ["sweep", str(scenario), "--out", str(out), "--workers", "1"])
    one_line_error(code, err)
    assert f"cannot write {calls[0]}: No space left on device" in err and "run the same command again" in err
    monkeypatch.setattr(sweep_module, "_append", real)
    outcome = run_sweep(SWEEP, out, workers=1)
    assert outcome["computed"] < 4 and out.read_bytes() == reference[fmt]


def test_a_read_only_folder_is_said_in_one_line(tmp_path, capsys, monkeypatch):
    def read_only(path, write):
        raise OSError(errno.EROFS, os.strerror(errno.EROFS), str(path))

    monkeypatch.setattr(sweep_module, "_write_new", read_only)
    scenario = tmp_path / "s.yaml"
    scenario.write_text(yaml.safe_dump(SWEEP, sort_keys=False))
    out = tmp_path / "r.csv"
    code, err = error_of(capsys, ["sweep", str(scenario), "--out", str(out), "--workers", "1"])
    one_line_error(code, err)
    assert f"--out {out}: Read-only file system" in err


@pytest.mark.parametrize("damage, says", [
    (lambda out: out.write_bytes(out.read_bytes()[:-60] + b"\xff\xfe" + out.read_bytes()[-60:]),
     "is not UTF-8 text"),
    (lambda out: (out.parent / (out.name + ".lhsim.json")).write_text("[]"),
     "is not an lhsim sidecar (expected a JSON object with the sweep's fingerprint, got a JSON list)"),
    (lambda out: (out.parent / (out.name + ".lhsim.json")).write_text("{"), "got unreadable"),
])
def test_a_damaged_csv_or_sidecar_is_refused_and_kept(tmp_path, capsys, damage, says):
    out = tmp_path / "r.csv"
    run_sweep(SWEEP, out, workers=1)
    damage(out)
    before = out.read_bytes()
    scenario = tmp_path / "s.yaml"
    scenario.write_text(yaml.safe_dump(SWEEP, sort_keys=False))
    code, err = error_of(capsys, ["sweep", str(scenario), "--out", str(out), "--workers", "1"])
    one_line_error(code, err)
    assert says in err and str(out) in err
    assert out.read_bytes() == before


def test_a_truncated_parquet_file_is_refused_and_kept(tmp_path, capsys):
    out = tmp_path / "r.parquet"
    run_sweep(SWEEP, out, workers=1)
    out.write_bytes(out.read_bytes()[:200])
    scenario = tmp_path / "s.yaml"
    scenario.write_text(yaml.safe_dump(SWEEP, sort_keys=False))
    code, err = error_of(capsys, ["sweep", str(scenario), "--out", str(out), "--workers", "1"])
    one_line_error(code, err)
    assert f"{out} is not a readable Parquet file" in err
    assert len(out.read_bytes()) == 200


def test_plot_into_a_missing_folder_is_refused(tmp_path, capsys):
    out = tmp_path / "r.csv"
    run_sweep(SWEEP, out, workers=1)
    target = tmp_path / "figures" / "chart.png"
    code, err = error_of(capsys, ["plot", str(out), "--x", "high_pressure", "--y", "liquid_yield",
                                  "--out", str(target)])
    one_line_error(code, err)
    assert f"--out {target}: the folder {target.parent} does not exist" in err
    assert not target.parent.exists()


# -- 4 (last bullet). workers bounded ---------------------------------------------------------------

def test_workers_are_bounded_by_the_points_and_the_cpus(tmp_path, monkeypatch):
    seen = []
    monkeypatch.setattr(sweep_module, "_run_processes",
                        lambda batches, workers, record, inherited=(): seen.append(workers) or
                        [record(sweep_module.run_batch(b)) for b in batches])
    run_sweep(SWEEP, tmp_path / "r.csv", workers=300, batch_size=1)
    assert seen == [min(4, os.cpu_count() or 1)] or (os.cpu_count() == 1 and seen == [])


# -- 7. no orphans, no traceback on Ctrl-C -------------------------------------------------------------

def _children(pid):
    out = []
    for entry in os.listdir("/proc"):
        if entry.isdigit():
            try:
                with open(f"/proc/{entry}/stat") as handle:
                    fields = handle.read().rsplit(")", 1)[1].split()
            except OSError:
                continue
            if int(fields[1]) == pid and fields[0] != "Z":
                out.append(int(entry))
    return out


def _alive(pid):
    try:
        with open(f"/proc/{pid}/stat") as handle:
            return handle.read().rsplit(")", 1)[1].split()[0] != "Z"
    except OSError:
        return False


def _slow_sweep(tmp_path, steps=150):
    slow = dict(BASE, recuperator={"min_approach": "2 K", "zones": 60})
    scenario = tmp_path / "sweep.yaml"
    scenario.write_text(yaml.safe_dump(dict(slow, sweep={"high_pressure": {"from": "60 bar", "to": "300 bar",
                                                                          "steps": steps}})))
    return scenario


def _started_sweep(tmp_path, **popen):
    scenario, out = _slow_sweep(tmp_path), tmp_path / "r.csv"
    cmd = [sys.executable, "-m", "cycle.cli", "sweep", str(scenario), "--out", str(out), "--workers", "2"]
    proc = subprocess.Popen(cmd, stdout=subprocess.DEVNULL, stderr=subprocess.PIPE, text=True, **popen)
    deadline = time.monotonic() + 60
    while time.monotonic() < deadline and proc.poll() is None:
        if out.exists() and out.read_bytes().count(b"\n") > 3 and len(_children(proc.pid)) >= 2:
            break
        time.sleep(0.05)
    return proc, out


def _wait_gone(pids, seconds=20):
    """Wait (bounded) until none of ``pids`` is alive."""
    deadline = time.monotonic() + seconds
    while time.monotonic() < deadline and any(_alive(pid) for pid in pids):
        time.sleep(0.05)


def _kill_all(pids):
    """Leave no process of a test behind."""
    for pid in pids:
        try:
            os.kill(pid, signal.SIGKILL)
        except OSError:
            pass


@pytest.mark.skipif(not sys.platform.startswith("linux"), reason="reads /proc")
def test_workers_exit_when_their_parent_is_killed(tmp_path):
    proc, _ = _started_sweep(tmp_path)
    workers = _children(proc.pid)
    try:
        assert proc.poll() is None and len(workers) == 2, "the sweep ended before it could be killed"
        os.kill(proc.pid, signal.SIGKILL)
        proc.wait(timeout=30)
        _wait_gone(workers)
        assert not any(_alive(w) for w in workers), "a worker outlived its parent"
    finally:
        _kill_all([proc.pid] + workers)
        proc.stderr.close()


@pytest.mark.skipif(not sys.platform.startswith("linux"), reason="reads /proc")
def test_ctrl_c_to_the_whole_process_group_stops_cleanly(tmp_path):
    proc, out = _started_sweep(tmp_path, start_new_session=True)
    workers = _children(proc.pid)
    try:
        assert proc.poll() is None, "the sweep ended before it could be interrupted"
        os.killpg(proc.pid, signal.SIGINT)  # what a terminal does on Ctrl-C: every process of the group
        _, err = proc.communicate(timeout=60)
        assert proc.returncode == 130, err
        assert "Traceback" not in err and "KeyboardInterrupt" not in err and "run the same command again" in err
        _wait_gone(workers)
        assert not any(_alive(w) for w in workers)
    finally:
        _kill_all([proc.pid] + workers)
    kept = out.read_bytes().count(b"\n") - 1
    assert run_sweep(yaml.safe_load((tmp_path / "sweep.yaml").read_text()), out, workers=2)["computed"] == 150 - kept


def test_a_ctrl_c_before_any_command_runs_is_no_traceback(capsys, monkeypatch):
    def interrupted():
        raise KeyboardInterrupt

    monkeypatch.setattr(cli, "_parser", interrupted)  # the first thing main does
    with pytest.raises(SystemExit) as info:
        cli.main_exit()
    assert info.value.code == 130 and capsys.readouterr().err == "lhsim: interrupted\n"
    monkeypatch.setattr(cli, "main", interrupted)  # anywhere in main, however early
    with pytest.raises(SystemExit) as info:
        cli.main_exit()
    assert info.value.code == 130 and capsys.readouterr().err == "lhsim: interrupted\n"


# -- 8. Dask addresses ------------------------------------------------------------------------------------

def _closed_port():
    with socket.socket() as probe:
        probe.bind(("127.0.0.1", 0))
        return probe.getsockname()[1]


def test_dask_addresses_that_lead_nowhere(tmp_path, capsys):
    pytest.importorskip("distributed")
    scenario = tmp_path / "s.yaml"
    scenario.write_text(yaml.safe_dump(SWEEP, sort_keys=False))
    out = tmp_path / "r.csv"
    silent = socket.socket()  # accepts connections (in its backlog) and never answers
    silent.bind(("127.0.0.1", 0))
    silent.listen(4)
    try:
        cases = [
            ("garbage", "--dask must be local or a scheduler address"),
            ("", "--dask must be local or a scheduler address such as tcp://127.0.0.1:8786, got ''"),
            (f"tcp://127.0.0.1:{_closed_port()}", "no Dask scheduler answered within 1 s"),
            (f"localhost:{_closed_port()}", "no Dask scheduler answered within 1 s"),
            (f"tcp://127.0.0.1:{silent.getsockname()[1]}", "no Dask scheduler answered within 1 s"),
            (f"tls://127.0.0.1:{_closed_port()}", "tls:// needs distributed's TLS certificates"),
        ]
        for address, says in cases:
            code, err = error_of(capsys, ["sweep", str(scenario), "--out", str(out), "--dask", address,
                                          "--dask-timeout", "1"])
            one_line_error(code, err)
            assert says in err, err
    finally:
        silent.close()
    assert not out.exists()  # refused before the results file was touched
    code, err = error_of(capsys, ["sweep", str(scenario), "--out", str(out), "--dask", "local",
                                  "--dask-timeout", "0"])
    one_line_error(code, err)
    assert "--dask-timeout must be a number of seconds above 0, got 0" in err


def test_the_sidecar_still_records_the_sweep(tmp_path):
    out = tmp_path / "r.csv"
    run_sweep(SWEEP, out, workers=1)
    meta = json.loads((tmp_path / "r.csv.lhsim.json").read_text())
    assert meta["format"] == 2 and meta["points"] == 4 and meta["columns"][:3] == ["point", "high_pressure_bar", "gas"]


def test_max_points_flag_refuses_a_sweep_too_large_before_computing(tmp_path, capsys):
    from cycle import cli

    path = tmp_path / "big.yaml"
    path.write_text("gas: nitrogen\nlow_pressure: 1.05 bar\nhigh_pressure: 200 bar\n"
                    "compressor: {isothermal_efficiency: 0.6}\nrecuperator: {effectiveness: 0.97}\n"
                    "sweep:\n  high_pressure: {from: 50 bar, to: 300 bar, steps: 1000}\n"
                    "  recuperator.effectiveness: {from: 0.9, to: 0.99, steps: 1000}\n"
                    "  ambient_temperature: {from: 280 K, to: 310 K, steps: 1000}\n")
    out = tmp_path / "r.csv"
    assert cli.main(["sweep", str(path), "--out", str(out)]) == 2
    assert "sweep has 1000000000 points" in capsys.readouterr().err
    small = path.read_text().replace("steps: 1000}\n  ambient", "steps: 2}\n  ambient").replace(
        "steps: 1000}\n  recuperator", "steps: 2}\n  recuperator").replace("310 K, steps: 1000", "310 K, steps: 2")
    path.write_text(small)
    assert cli.main(["sweep", str(path), "--out", str(out), "--max-points", "7", "--workers", "1"]) == 2
    assert "more than the limit of 7" in capsys.readouterr().err and not out.exists()
    assert cli.main(["sweep", str(path), "--out", str(out), "--max-points", "8", "--workers", "1"]) == 0
    assert cli.main(["sweep", str(path), "--out", str(out), "--max-points", "0"]) == 2
