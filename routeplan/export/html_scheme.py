"""Pieces the scheme drawing needs besides its layout: structures and formula text.

Structures are drawn by RDKit's SVG depiction (:class:`rdkit.Chem.Draw.rdMolDraw2D.MolDraw2DSVG`,
the ``smiles`` extra) into the box size the layout reserved; without RDKit a box shows
the name and formula only.  Formulas are split into runs so that the template sets the
atom counts as subscripts.
"""

from __future__ import annotations

import re
from typing import TYPE_CHECKING

from routeplan.views.scheme import STRUCTURE_SIZE

if TYPE_CHECKING:  # pragma: no cover
    from routeplan.views.scheme import Scheme

__all__ = ["structure_svgs", "formula_runs"]


def formula_runs(formula: str) -> list[tuple[str, bool]]:
    """``formula`` as runs of ``(text, subscript)``: counts after an element or bracket are subscripts.

    A leading count (the 5 of a hydrate's ``·5H2O``) stays on the line.

    Examples
    --------
    >>> formula_runs("C6H7NO")
    [('C', False), ('6', True), ('H', False), ('7', True), ('NO', False)]
    >>> formula_runs("CuSO4·5H2O")
    [('CuSO', False), ('4', True), ('·5H', False), ('2', True), ('O', False)]
    """
    runs: list[tuple[str, bool]] = []
    for m in re.finditer(r"(?<=[A-Za-z)\]])\d+|[^\d]+|\d+", formula):
        text = m.group(0)
        sub = text.isdigit() and m.start() > 0 and re.match(r"[A-Za-z)\]]", formula[m.start() - 1]) is not None
        if runs and runs[-1][1] == sub:
            runs[-1] = (runs[-1][0] + text, sub)
        else:
            runs.append((text, sub))
    return runs


def _depict(smiles: str, width: float, height: float) -> str | None:
    from rdkit import Chem, RDLogger
    from rdkit.Chem.Draw import rdMolDraw2D

    RDLogger.DisableLog("rdApp.*")
    mol = Chem.MolFromSmiles(smiles)
    if mol is None:
        return None
    drawer = rdMolDraw2D.MolDraw2DSVG(int(width), int(height))
    opts = drawer.drawOptions()
    opts.clearBackground = False
    opts.bondLineWidth = 1.2
    opts.fixedBondLength = 22  # one scale for every structure that fits its box [px]
    rdMolDraw2D.PrepareAndDrawMolecule(drawer, mol)
    drawer.FinishDrawing()
    svg = drawer.GetDrawingText()
    svg = re.sub(r"<\?xml[^>]*\?>\s*", "", svg)
    # RDKit's root element carries no id; the drawing is placed by the template's <svg x= y=>
    return svg.replace("<svg ", "<svg class=\"structure\" ", 1).strip()


def structure_svgs(scheme: "Scheme") -> dict[str, str]:
    """Node key -> SVG of its structure, for every box with a SMILES RDKit reads.

    Empty when RDKit is not installed (the boxes then show name and formula).
    """
    try:
        import rdkit  # noqa: F401
    except ImportError:
        return {}
    out = {}
    cache: dict[str, str | None] = {}
    for n in scheme.nodes:
        if n.smiles:
            if n.smiles not in cache:
                cache[n.smiles] = _depict(n.smiles, *STRUCTURE_SIZE)
            if cache[n.smiles] is not None:
                out[n.key] = cache[n.smiles]
    return out
