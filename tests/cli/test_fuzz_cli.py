"""A wider fuzz of route files, stock files and command lines through the command line,
in-process: mutated characters, deleted lines, swapped values, extreme numbers.

The promise checked: bad input exits with code 2 and a message, never a traceback, never
another exit code, never a hang (every example has a deadline of 10 s); output files are
whole or absent.  The budget is modest (a few hundred examples in all) so that the suite
stays quick; hypothesis keeps the failing examples it finds in its database.
"""

from __future__ import annotations

import json
import re
import tempfile
from pathlib import Path

from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from conftest import GOOD_ROUTE

GOOD = GOOD_ROUTE.read_text(encoding="utf-8")
LINES = GOOD.splitlines(keepends=True)

#: Characters a slip inserts: digits, signs, YAML punctuation, a decimal comma, look-alikes.
SLIPS = "0123456789.,:-+%{}[]#'\" \n\tOoeEАе··^"
#: Numbers at and beyond the edges of what a float and a route can hold.
EXTREMES = ["0", "-1", "1e-300", "1e300", "1e308", "1e309", "nan", ".inf", "-.inf", "1e6", "1000001",
            "0.0000001", "99999999999999999999", "1,5", "1,000", "0 %", "1e-300 %", "1e300 %", "100 %"]
_NUMBER = re.compile(r"(?<![A-Za-z])\d+(?:\.\d+)?(?:e[+-]?\d+)?")

SETTINGS = settings(deadline=10_000, derandomize=True, database=None, print_blob=True,
                    suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture])


@st.composite
def mutated_route(draw) -> str:
    lines = list(LINES)
    for _ in range(draw(st.integers(1, 3))):
        op = draw(st.sampled_from(["char", "delete", "swap", "extreme", "insert"]))
        i = draw(st.integers(0, len(lines) - 1))
        line = lines[i]
        if op == "char" and line.strip():
            j = draw(st.integers(0, len(line) - 1))
            lines[i] = line[:j] + draw(st.sampled_from(SLIPS)) + line[j + 1:]
        elif op == "insert":
            j = draw(st.integers(0, len(line)))
            lines[i] = line[:j] + draw(st.sampled_from(SLIPS)) + line[j:]
        elif op == "delete":
            del lines[i]
        elif op == "swap":
            k = draw(st.integers(0, len(lines) - 1))
            a, b = lines[i].partition(":"), lines[k].partition(":")
            if a[1] and b[1]:
                lines[i], lines[k] = a[0] + ":" + b[2], b[0] + ":" + a[2]
        elif op == "extreme":
            numbers = list(_NUMBER.finditer(line))
            if numbers:
                m = numbers[draw(st.integers(0, len(numbers) - 1))]
                lines[i] = line[:m.start()] + draw(st.sampled_from(EXTREMES)) + line[m.end():]
        if not lines:
            break
    return "".join(lines)


def _invoke(args):
    from click.testing import CliRunner

    from routeplan.cli import cli

    return CliRunner().invoke(cli, [str(a) for a in args], catch_exceptions=True)


def _assert_promise(result, outputs=()) -> None:
    text = result.output
    assert result.exit_code in (0, 2), (result.exit_code, text[-2000:], result.exception)
    assert result.exception is None or isinstance(result.exception, SystemExit), repr(result.exception)
    assert "Traceback" not in text and "internal error" not in text, text[-2000:]
    if result.exit_code == 2:
        assert "error" in result.stderr, text[-2000:]
    for path in outputs:
        if path.suffix == ".json" and path.exists():
            json.loads(path.read_text(encoding="utf-8"),  # whole, and no NaN or Infinity
                       parse_constant=lambda c: (_ for _ in ()).throw(AssertionError(f"{c} in {path}")))
    for path in outputs:
        folder = path.parent
        assert not [p for p in folder.iterdir() if p.name.startswith(".")], "temporary files left behind"


@settings(SETTINGS, max_examples=120)
@given(text=mutated_route(), command=st.sampled_from(["check", "plan"]))
def test_mutated_route_files_keep_the_promise(text, command):
    with tempfile.TemporaryDirectory() as tmp:
        route = Path(tmp) / "route.yaml"
        route.write_text(text, encoding="utf-8")
        out = Path(tmp) / "plan.json"
        args = [command, route] + (["--json", out, "-q"] if command == "plan" else [])
        _assert_promise(_invoke(args), [out])

MATERIALS = ["acetone", "K2CO3", "caustic", "HCl6M", "acid", "salt", "water", "nothing", "Аc2O", ""]
AMOUNTS = ["10", "0", "-5", "1,000", "1,5", "1e308", "1e-300", "nan", "inf", "", "=A1", "10 kg", "abc"]
UNITS = ["kg", "L", "lb", "g/mL", "mol", "", "%", "ton", "kg;"]


@settings(SETTINGS, max_examples=60)
@given(rows=st.lists(st.tuples(st.sampled_from(MATERIALS), st.sampled_from(AMOUNTS), st.sampled_from(UNITS)),
                     min_size=0, max_size=4),
       kind=st.sampled_from(["csv", "yaml"]), header=st.booleans())
def test_stock_files_keep_the_promise(rows, kind, header):
    import csv
    import io

    with tempfile.TemporaryDirectory() as tmp:
        route = Path(tmp) / "route.yaml"
        route.write_text(GOOD, encoding="utf-8")
        stock = Path(tmp) / f"stock.{kind}"
        if kind == "csv":
            buf = io.StringIO()
            writer = csv.writer(buf)
            if header:
                writer.writerow(["material", "amount", "unit"])
            writer.writerows(rows)
            stock.write_text(buf.getvalue(), encoding="utf-8")
        else:
            stock.write_text("".join(f"{m or 'x'}: {a} {u}\n" for m, a, u in rows), encoding="utf-8")
        _assert_promise(_invoke(["plan", route, "--stock", stock, "-q"]))


TARGETS = ["25 kg", "90 lb", "0 kg", "-1 kg", "1e400 kg", "1e20 kg", "1e-300 kg", "5 L", "kg", "1,5 kg", "nan kg"]


@settings(SETTINGS, max_examples=80)
@given(command=st.sampled_from(["plan", "compare", "check"]),
       target=st.none() | st.sampled_from(TARGETS),
       yields=st.none() | st.sampled_from(["low", "high", "expected", "worst"]),
       strict=st.booleans(), confidence=st.none() | st.sampled_from(["90 %", "0.5", "150 %", "x"]),
       outputs=st.lists(st.sampled_from(["json", "json-", "xlsx", "csv", "bad-xlsx", "missing-folder"]),
                        max_size=3, unique=True))
def test_command_lines_keep_the_promise(command, target, yields, strict, confidence, outputs):
    demo = Path(__file__).resolve().parents[2] / "demo_routes"
    with tempfile.TemporaryDirectory() as tmp:
        tmp = Path(tmp)
        args: list = [command, demo / "hx17-linear.yaml"]
        if command == "compare":
            args.append(demo / "hx17-convergent.yaml")
        if command != "check":
            if target is not None:
                args += ["--target", target]
            if yields is not None:
                args += ["--yields", yields]
            if confidence is not None:
                args += ["--confidence", confidence, "--draws", "500"]
            for o in outputs:
                args += {"json": ["--json", tmp / "o.json"], "json-": ["--json", "-"],
                         "xlsx": ["--xlsx", tmp / "o.xlsx"], "csv": ["--csv", tmp / "tables"],
                         "bad-xlsx": ["--xlsx", tmp / "o.txt"],
                         "missing-folder": ["--json", tmp / "no" / "o.json"]}[o]
            if command == "compare":
                args = [a for a in args if a not in ("--csv", tmp / "tables")]
        if strict and command != "compare":
            args.append("--strict")
        result = _invoke(args)
        if yields == "worst" and command != "check":
            assert result.exit_code == 2 and "Traceback" not in result.output
            return
        _assert_promise(result, [tmp / "o.json"])
        if result.exit_code == 2:
            written = [p for p in tmp.rglob("*") if p.is_file()]
            assert not written, f"a failed run wrote {written}"
