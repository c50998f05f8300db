"""LibreOffice headless for the workbook tests: convert (recalculate or print) workbooks.

Source: LibreOffice Calc, run headless.  Each run gets a private user profile whose setting
``/org.openoffice.Office.Calc/Formula/Load/OOXMLRecalcMode = 0`` ("always recalculate" on
load; LibreOffice's own default is 1, "never", so without it the cached values would come
back unchanged).  A canary workbook whose formula ``=A1*3`` is stored with a wrong value
(999) must come back as 6: proof that LibreOffice did recalculate.
"""

from __future__ import annotations

import shutil
import subprocess
from pathlib import Path

from conftest import missing_tool

SOFFICE = shutil.which("soffice")

_PROFILE_SETTINGS = """<?xml version="1.0" encoding="UTF-8"?>
<oor:items xmlns:oor="http://openoffice.org/2001/registry" xmlns:xs="http://www.w3.org/2001/XMLSchema"
           xmlns:xsi="http://www.w3.org/2001/XMLSchema-instance">
<item oor:path="/org.openoffice.Office.Calc/Formula/Load"><prop oor:name="OOXMLRecalcMode" oor:op="fuse"><value>0</value></prop></item>
</oor:items>
"""


def need_soffice() -> None:
    """Skip (fail under CI) when LibreOffice is not installed."""
    if SOFFICE is None:
        missing_tool("LibreOffice (soffice) is not installed: the recalculation check needs it "
                     "(.ci/run installs libreoffice-calc-nogui)")


def run_soffice(files: list[Path], out: Path, profile: Path, to: str = "xlsx") -> None:
    """Convert ``files`` into the folder ``out`` (``to``: ``xlsx`` recalculates, ``pdf`` prints)."""
    (profile / "user").mkdir(parents=True)
    (profile / "user" / "registrymodifications.xcu").write_text(_PROFILE_SETTINGS, encoding="utf-8")
    cmd = [SOFFICE, f"-env:UserInstallation={profile.as_uri()}", "--headless", "--norestore",
           "--convert-to", to, "--outdir", str(out), *map(str, files)]
    done = subprocess.run(cmd, capture_output=True, text=True, timeout=180)
    missing = [f.name for f in files if not (out / f.with_suffix("." + to).name).is_file()]
    assert not missing, f"soffice did not convert {missing}: {done.stdout}\n{done.stderr}"


def write_canary(folder: Path) -> Path:
    """The canary workbook ``folder/canary.xlsx``: ``A1 = 2``, ``B1 = A1*3`` stored as 999."""
    import xlsxwriter

    canary = folder / "canary.xlsx"
    cw = xlsxwriter.Workbook(str(canary))
    sheet = cw.add_worksheet("c")
    sheet.write_number(0, 0, 2)
    sheet.write_formula(0, 1, "=A1*3", None, 999)
    cw.close()
    return canary


def canary_value(out: Path):
    """The canary's formula cell as LibreOffice left it in ``out`` (6 when it recalculated)."""
    import openpyxl

    return openpyxl.load_workbook(out / "canary.xlsx", data_only=True)["c"]["B1"].value
