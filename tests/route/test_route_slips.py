"""Route-file slips that used to pass or to be reported without what would be right: a
telescoped target step, a key with a look-alike letter, and two bases on one line."""

from __future__ import annotations

from conftest import run_edited
from route_edits import line_of


def test_target_step_with_isolated_false_is_an_error(tmp_path, good_text):
    text, path, result = run_edited(tmp_path, good_text, [("    limiting: salt\n",
                                                          "    limiting: salt\n    isolated: false\n")],
                                    command="plan")
    assert result.exit_code == 2
    assert f"error: {path}:{line_of(text, ('limiting: salt', 1))}:" in result.stderr
    assert "step S4 makes the target 'acid' but says 'isolated: false'" in result.stderr
    assert "cannot be delivered by mass" in result.stderr


def test_key_with_a_cyrillic_lookalike_names_the_character(tmp_path, good_text):
    text, path, result = run_edited(tmp_path, good_text, [("  Ac2O:\n", "  \u0410c2O:\n")])
    assert result.exit_code == 2
    first = result.stderr.splitlines()[0]
    assert first.startswith(f"error: {path}:{line_of(text, chr(0x410) + 'c2O:')}:3:")
    assert "U+0410 CYRILLIC CAPITAL LETTER A" in first and "write 'Ac2O'" in first
    # the equation and the charge line that use the Latin key say why it is not found
    assert result.stderr.count("the material is defined as '\u0410c2O'") == 2


def test_a_lookalike_in_a_charge_line_names_it_too(tmp_path, good_text):
    _, _, result = run_edited(tmp_path, good_text, [("{material: Ac2O, equiv: 1.1}",
                                                     "{material: \u0410c2O, equiv: 1.1}")])
    assert result.exit_code == 2 and "U+0410" in result.stderr and "write 'Ac2O'" in result.stderr


def test_check_on_a_line_with_two_bases_names_the_material(tmp_path, good_text):
    text, path, result = run_edited(tmp_path, good_text, [("{material: Ac2O, equiv: 1.1}",
                                                          "{material: Ac2O, equiv: 1.1, mass_ratio: 1}")])
    assert result.exit_code == 2
    assert f"{path}:{line_of(text, 'mass_ratio: 1}')}:" in result.stderr
    assert "the line of Ac2O gives both equiv and mass_ratio" in result.stderr
