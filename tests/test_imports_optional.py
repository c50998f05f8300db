"""Every module of routeplan imports without the optional extras (rdkit, matplotlib).

pytest collects the docstring examples of every module (``--doctest-modules`` over
routeplan/), so importing a module must not need an extra: an extra is imported inside the
function that uses it.  Here each module is imported in a fresh interpreter in which
importing an extra fails.
"""

import subprocess
import sys
from pathlib import Path

PKG = Path(__file__).resolve().parents[1] / "routeplan"
EXTRAS = ("rdkit", "matplotlib")

CODE = f"""
import importlib, importlib.abc, sys
class Refuse(importlib.abc.MetaPathFinder):
    def find_spec(self, name, path=None, target=None):
        if name.split(".")[0] in {EXTRAS!r}:
            raise ImportError("optional extra " + name + " is not installed")
        return None
sys.meta_path.insert(0, Refuse())
for name in sys.argv[1:]:
    importlib.import_module(name)
try:
    import rdkit
except ImportError:
    print("refused")
"""


def _modules():
    for p in sorted(PKG.rglob("*.py")):
        parts = list(p.relative_to(PKG.parent).with_suffix("").parts)
        if parts[-1] == "__init__":
            parts.pop()
        if parts[-1] != "__main__":
            yield ".".join(parts)


def test_every_module_imports_without_the_extras():
    names = list(_modules())
    assert len(names) > 40
    res = subprocess.run([sys.executable, "-c", CODE, *names], capture_output=True, text=True, timeout=300)
    assert res.returncode == 0, res.stderr
    assert res.stdout.strip() == "refused"  # the blocker works, so the imports above did not need an extra
