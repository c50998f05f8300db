"""The command line answers fast and imports nothing heavy for --help."""

import json
import os
import subprocess
import sys

import routeplan


def _run(*args, env=None):
    return subprocess.run([sys.executable, *args], capture_output=True, text=True, env=env, timeout=60)


def test_version():
    out = _run("-m", "routeplan", "--version")
    assert out.returncode == 0
    assert routeplan.__version__ in out.stdout


def test_help_lists_commands_and_caution():
    out = _run("-m", "routeplan", "--help")
    assert out.returncode == 0
    assert "plan" in out.stdout and "check" in out.stdout
    assert "hazards" in out.stdout


def test_import_pulls_in_nothing_heavy():
    code = ("import sys, routeplan, routeplan.cli; "
            "import json; print(json.dumps(sorted(m for m in ('pint','networkx','pandas','xlsxwriter',"
            "'openpyxl','pydantic','ruamel','numpy','rich','jinja2','matplotlib','rdkit') if m in sys.modules)))")
    out = _run("-c", code)
    assert out.returncode == 0, out.stderr
    assert json.loads(out.stdout) == []


def test_help_is_fast():
    # a loose guard (the ratio to a bare "import click" is measured in bench/engine_bench.py):
    # in-process, importing the command line and printing the help costs a small multiple of
    # importing click itself, measured side by side so that a loaded machine slows both
    code = ("import time; t=time.perf_counter(); from routeplan.cli import cli; "
            "import click.testing; r=click.testing.CliRunner().invoke(cli, ['--help']); "
            "print(time.perf_counter()-t)")
    floor = "import time; t=time.perf_counter(); import click, click.testing; print(time.perf_counter()-t)"
    best = min(float(_run("-c", code).stdout) for _ in range(3))
    bare = min(float(_run("-c", floor).stdout) for _ in range(3))
    assert best < max(0.10, 4 * bare), f"routeplan --help took {best:.3f} s in-process, import click {bare:.3f} s"


def test_a_closed_pipe_ends_quietly(tmp_path):
    # `routeplan plan ... | head -1`: the reader leaves early; no traceback, a shell's 141.
    # The plan of 150 steps prints far more than a pipe holds (64 KiB on Linux), so the
    # writer is still writing when the reader leaves, however fast it is.
    sys.path.insert(0, os.path.join(os.path.dirname(__file__), os.pardir, os.pardir, "bench"))
    from plan_bench import linear_route

    route = tmp_path / "long.yaml"
    route.write_text(linear_route(150), encoding="utf-8")
    p = subprocess.Popen([sys.executable, "-m", "routeplan", "plan", str(route)], stdout=subprocess.PIPE,
                         stderr=subprocess.PIPE)
    first = p.stdout.readline()
    p.stdout.close()
    err = p.stderr.read().decode()
    assert p.wait(timeout=60) == 141
    assert first.startswith(b"bench linear")
    assert "Traceback" not in err and "internal error" not in err
