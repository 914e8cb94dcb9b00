"""The hand check on small books typed here: rearrangements, limits, what is never claimed."""

from __future__ import annotations

import openpyxl
import pytest

import stillair
from stillair.addin.audit.hand import MAX_INPUTS, check_hand_book


def _book(tmp_path, cells, name="book.xlsx"):
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Calc"
    for ref, value in cells.items():
        ws[ref] = value
    path = tmp_path / name
    wb.save(path)
    return str(path)


def _plate_inputs():
    p = stillair.gas_properties("air", 35.0)
    return {"B1": 45.0, "B2": 25.0, "B3": 0.5, "B4": 1 / (35 + 273.15), "B5": p.kinvisc,
            "B6": p.diffusivity, "B7": p.prandtl}


def test_a_rearranged_rayleigh_number_is_recognised(tmp_path):
    """The test is numerical: the factors in any order, divided one by one, g last."""
    path = _book(tmp_path, dict(_plate_inputs(), C1="=B3^3*B4*(B1-B2)/B5/B6*9.80665"))
    result = check_hand_book(path)
    (ra,) = result.recognised
    assert ra.form.quantity == "Ra" and ra.ratio == 1.0 and not result.findings
    # the same number as the engine's definition g beta dT L^3/(nu alpha) (groups.py)
    inputs = _plate_inputs()
    expected = 9.80665 * inputs["B4"] * 20 * 0.5 ** 3 / (inputs["B5"] * inputs["B6"])
    assert ra.value == pytest.approx(expected, rel=1e-12)


def test_churchill_chu_typed_by_hand_is_named_from_the_registry(tmp_path):
    cells = dict(_plate_inputs(), C1="=9.80665*B4*(B1-B2)*B3^3/(B5*B6)",
                 C2="=(0.825+0.387*C1^(1/6)/(1+(0.492/B7)^(9/16))^(8/27))^2")
    result = check_hand_book(_book(tmp_path, cells))
    nu = next(r for r in result.recognised if r.form.quantity == "Nu")
    assert (nu.form.geometry, nu.form.method) == ("vplate", "churchill-chu")
    assert nu.value == pytest.approx(float(stillair.nu_vplate(nu.values["ra"], nu.values["pr"],
                                                                method="churchill-chu")), rel=1e-12)


def test_a_mistyped_constant_is_named_with_the_value_that_matches(tmp_path):
    cells = dict(_plate_inputs(), C1="=9.80665*B4*(B1-B2)*B3^3/(B5*B6)",
                 C2="=(0.825+0.387*C1^(1/6)/(1+(0.429/B7)^(9/16))^(8/27))^2")
    result = check_hand_book(_book(tmp_path, cells))
    (finding,) = result.findings
    assert finding.kind == "constant" and finding.cell == "Calc!C2"
    assert "0.429" in finding.message and "0.492" in finding.message


def test_products_and_sums_are_never_claimed(tmp_path):
    result = check_hand_book(_book(tmp_path, {"B1": 2.0, "B2": 3.0, "B3": 5.0, "C1": "=B1*B2",
                                              "C2": "=B1+B2+B3", "C3": "=(B1+B2)/2"}))
    assert not result.recognised and not result.findings
    assert result.unrecognised == ["Calc!C1", "Calc!C2", "Calc!C3"]


def test_a_formula_of_too_many_inputs_is_said_to_be_too_large(tmp_path):
    cells = {f"A{i}": float(i) for i in range(1, MAX_INPUTS + 2)}
    cells["B1"] = "=" + "*".join(f"A{i}" for i in range(1, MAX_INPUTS + 2))
    result = check_hand_book(_book(tmp_path, cells))
    assert result.too_large == ["Calc!B1"]
    assert "too large to identify" in result.summary()


def test_a_missing_book_names_the_path(tmp_path):
    from stillair.addin.workbook.reader import BookError
    missing = str(tmp_path / "none.xlsx")
    with pytest.raises((BookError, OSError), match="none.xlsx"):
        check_hand_book(missing)


def test_a_prandtl_number_typed_into_the_correlation_is_recognised_and_checked(tmp_path):
    """Churchill-Chu with Pr = 0.71 written into the formula: recognised with Pr from the
    formula's own numbers, and Pr compared with air's at the film temperature (35 degC)."""
    cells = dict(_plate_inputs(), C1="=9.80665*B4*(B1-B2)*B3^3/(B5*B6)",
                 C2="=(0.825+0.387*C1^(1/6)/(1+(0.492/0.71)^(9/16))^(8/27))^2")
    result = check_hand_book(_book(tmp_path, cells))
    nu = next(r for r in result.recognised if r.form.quantity == "Nu")
    assert nu.form.method == "churchill-chu" and nu.values["pr"] == 0.71
    (statement,) = [s for s in nu.statements if "Prandtl" in s]
    assert "typed in the formula of Calc!C2" in statement and "35.0 degC" in statement
    assert not result.findings   # 0.71 against air's 0.706 moves Nu by far less than 2 %


def _plate_chain(**changes):
    """A vertical plate typed by hand: Ra, Churchill-Chu, h, area, heat flow, radiation, a
    surface resistance and the two resistances in parallel."""
    p = stillair.gas_properties("air", 35.0)
    cells = {"B1": 45.0, "B2": 25.0, "B3": 0.5, "B4": 0.8, "B5": p.kinvisc, "B6": p.diffusivity,
             "B7": p.prandtl, "B8": p.conductivity, "B9": 0.9,
             "C1": "=1/((B1+B2)/2+273.15)", "C2": "=9.80665*C1*(B1-B2)*B3^3/(B5*B6)",
             "C3": "=(0.825+0.387*C2^(1/6)/(1+(0.492/B7)^(9/16))^(8/27))^2",
             "C4": "=C3*B8/B3", "C5": "=B3*B4", "C6": "=C4*C5*(B1-B2)",
             "C7": "=5.670374419E-8*B9*((B1+273.15)^2+(B2+273.15)^2)*(B1+B2+546.3)",
             "C8": "=1/(C4*C5)", "C9": "=1/(C7*C5)", "C10": "=1/(1/C8+1/C9)", "C11": "=C4+C7"}
    cells.update(changes)
    return cells


def test_a_whole_plate_calculation_is_recognised_and_agrees(tmp_path):
    result = check_hand_book(_book(tmp_path, _plate_chain()))
    quantities = {r.cell: r.form.quantity for r in result.recognised}
    assert quantities == {"Calc!C1": "beta", "Calc!C2": "Ra", "Calc!C3": "Nu", "Calc!C4": "h",
                          "Calc!C6": "Q", "Calc!C7": "hrad", "Calc!C8": "R", "Calc!C9": "R",
                          "Calc!C10": "R", "Calc!C11": "h"}
    assert result.unrecognised == ["Calc!C5"]   # a product of two lengths is never claimed
    assert not result.findings
    # the hand h equals the engine's one-call h_vplate with the same (ideal-gas) expansion
    h = next(r for r in result.recognised if r.cell == "Calc!C4").value
    assert h == pytest.approx(float(stillair.h_vplate(45.0, 25.0, 0.5)), rel=2e-3)


def test_a_heat_flow_on_another_temperature_difference_is_a_finding(tmp_path):
    result = check_hand_book(_book(tmp_path, _plate_chain(C6="=C4*C5*(B1-B10)", B10=20.0)))
    (finding,) = result.findings
    assert (finding.kind, finding.cell) == ("difference", "Calc!C6")
    assert finding.engine == pytest.approx(finding.value * 20.0 / 25.0, rel=1e-12)


@pytest.mark.parametrize("changes, kind, cell", [
    ({"C1": "=1/((B1+B2)/2)"}, "beta-celsius", "Calc!C1"),
    ({"C2": "=9.80665/((B1+B2)/2)*(B1-B2)*B3^3/(B5*B6)"}, "beta-celsius", "Calc!C2"),
    ({"C7": "=5.670374419E-8*B9*(B1^2+B2^2)*(B1+B2)"}, "celsius", "Calc!C7"),
    ({"C4": "=C3*B8/B4"}, "length", "Calc!C4"),
    ({"C5": "=B4*B4"}, "area", "Calc!C6"),
    ({"C2": "=9.18*C1*(B1-B2)*B3^3/(B5*B6)"}, "constant", "Calc!C2"),
    ({"B3": 3.0, "C3": "=0.68+0.67*C2^0.25/(1+(0.492/B7)^(9/16))^(4/9)"}, "out-of-range",
     "Calc!C3"),   # Churchill and Chu's laminar form at Ra ~ 1e11
])
def test_each_kind_of_mistake_is_found_where_it_is(tmp_path, changes, kind, cell):
    result = check_hand_book(_book(tmp_path, _plate_chain(**changes)))
    assert (kind, cell) in {(f.kind, f.cell) for f in result.findings}, result.findings


def test_a_property_at_the_wrong_temperature_names_where_it_is_right(tmp_path):
    """nu of air at 0 degC typed for a 35 degC film: Ra moves by ~ 25 %."""
    nu_cold = stillair.air_kinvisc(0.0)
    result = check_hand_book(_book(tmp_path, _plate_chain(B5=nu_cold)))
    (finding,) = [f for f in result.findings if f.kind == "property"]
    assert finding.cell == "Calc!C2"
    assert "right at 0.0 degC" in finding.message and "35.0 degC" in finding.message
    assert finding.engine == pytest.approx(finding.value * nu_cold / stillair.air_kinvisc(35.0),
                                           rel=1e-9)


def test_the_gas_named_on_the_sheet_is_the_one_compared(tmp_path):
    """Argon properties typed on a sheet that says argon: no finding; the same numbers on a
    sheet that does not name a gas are compared with air and flagged."""
    p = stillair.gas_properties("argon", 35.0)
    typed = dict(B5=p.kinvisc, B6=p.diffusivity, B7=p.prandtl, B8=p.conductivity)
    named = check_hand_book(_book(tmp_path, _plate_chain(A1="Fill: argon", **typed), "a.xlsx"))
    assert not named.findings
    unnamed = check_hand_book(_book(tmp_path, _plate_chain(**typed), "b.xlsx"))
    assert {f.kind for f in unnamed.findings} == {"property"}


def test_the_audit_reports_hand_findings_in_json_and_in_its_report(tmp_path, capsys):
    import json

    import openpyxl as xl

    from stillair.addin.audit.check import main
    path = _book(tmp_path, _plate_chain(C4="=C3*B8/B4"))
    assert main([path, "--json", "--report", str(tmp_path / "REPORT.xlsx")]) == 1
    data = json.loads(capsys.readouterr().out)
    (finding,) = data["findings"]
    assert (finding["kind"], finding["check"], finding["cell"]) == ("hand-formula", "length",
                                                                     "Calc!C4")
    assert finding["recognised"] == "convection coefficient, Nu k/L"
    # no stored value in a file openpyxl wrote: the workbook's value recomputed from its inputs
    assert finding["computed"] == pytest.approx(finding["cached"] * 0.8 / 0.5, rel=1e-9)
    assert data["counts"]["hand-formula"] == 1
    hand = data["hand"]
    assert hand["summary"].startswith("10 hand formulas recognised: 9 agree, 1 with findings")
    h = next(r for r in hand["recognised"] if r["cell"] == "Calc!C4")
    assert h["input_cells"] == {"nusselt": "Calc!C3", "conductivity": "Calc!B8",
                                "length": "Calc!B4"}
    report = xl.load_workbook(tmp_path / "REPORT.xlsx")
    rows = list(report["Findings"].iter_rows(min_row=2, values_only=True))
    assert [(r[0], r[1]) for r in rows] == [("hand-formula", "Calc!C4")]
    recognised = list(report["Hand formulas"].iter_rows(min_row=2, max_row=11, values_only=True))
    assert {r[0] for r in recognised} >= {"Calc!C2", "Calc!C3", "Calc!C4"}


def test_a_hand_calculation_beside_one_of_our_cells_is_looked_at(tmp_path, capsys):
    """The issue's case: a hand-typed Churchill-Chu formula, a typed conductivity and one
    =H_VPLATE(...) cell; the audit used to say "1 cell checked: 1 ok" and never looked at the
    hand calculation, where the conductivity is typed at 0 degC for a 35 degC film."""
    from stillair.addin.audit.check import audit_book
    cells = _plate_chain(B8=stillair.air_conductivity(-20.0), D1="=H_VPLATE(B1,B2,B3)")
    result = audit_book(_book(tmp_path, cells))
    assert result.counts()["ok"] + result.counts()["stale"] == 1   # H_VPLATE, as before
    (finding,) = [f for f in result.findings if f.kind == "hand-formula"]
    assert (finding.check, finding.cell) == ("property", "Calc!C4")
    from stillair.addin.audit.report import summary_line
    assert "10 hand formulas recognised: 9 agree, 1 with findings" in summary_line(result)


def test_an_unreadable_file_is_one_line_from_the_audit(tmp_path, capsys):
    from stillair.addin.audit.check import main
    text = tmp_path / "notes.xlsx"
    text.write_text("not a workbook")
    assert main([str(text)]) == 2
    err = capsys.readouterr().err
    assert err.startswith("stillair audit: ") and "notes.xlsx" in err and err.count("\n") == 1


def test_inputs_read_through_defined_names_are_followed(tmp_path):
    from openpyxl.workbook.defined_name import DefinedName

    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Calc"
    for ref, value in _plate_inputs().items():
        ws[ref] = value
    for name, ref in (("Ts", "B1"), ("Tair", "B2"), ("H", "B3"), ("beta", "B4"), ("nu", "B5"),
                      ("alpha", "B6")):
        wb.defined_names[name] = DefinedName(name, attr_text=f"Calc!${ref[0]}${ref[1:]}")
    ws["C1"] = "=9.80665*beta*(Ts-Tair)*H^3/(nu*alpha)"
    path = tmp_path / "named.xlsx"
    wb.save(path)
    result = check_hand_book(str(path))
    (ra,) = result.recognised
    assert ra.form.quantity == "Ra" and not result.findings
    # nu and alpha are symmetric in the formula: told apart by the gas's own values
    assert ra.roles["length"] == ("Calc", "B3") and ra.roles["kinvisc"] == ("Calc", "B5")


def _loop(iterate: bool):
    """T = 20 + 100/(h A), h = 1.5 (T - 20)^(1/4) + 5: a surface temperature by iteration."""
    wb = openpyxl.Workbook()
    ws = wb.active
    ws.title = "Calc"
    ws["B1"], ws["B2"], ws["B3"] = 100.0, 2.0, 20.0
    ws["B4"] = "=B3+B1/MAX(B5*B2,1)"   # from blank cells the first pass must not divide by 0
    ws["B5"] = "=1.5*ABS(B4-B3)^0.25+5"
    wb.calculation.iterate = iterate
    wb.calculation.iterateDelta = 1e-6
    return wb


def test_a_loop_without_iterative_calculation_is_a_finding(tmp_path):
    path = tmp_path / "loop.xlsx"
    _loop(False).save(path)
    result = check_hand_book(str(path))
    (finding,) = result.findings
    assert finding.kind == "circular" and finding.cell in ("Calc!B4", "Calc!B5")


def test_an_iterated_loop_is_settled_and_its_converged_values_given(tmp_path):
    """No stored values (a file never calculated): not converged; the converged state satisfies
    both equations of the loop."""
    path = tmp_path / "loop.xlsx"
    _loop(True).save(path)
    result = check_hand_book(str(path))
    assert result.iteration["reached"] and not result.iteration["converged"]
    values = result.iteration["values"]
    t, h = values["Calc!B4"]["converged"], values["Calc!B5"]["converged"]
    assert t == pytest.approx(20 + 100 / (h * 2), rel=1e-6)
    assert h == pytest.approx(1.5 * (t - 20) ** 0.25 + 5, rel=1e-6)
    assert [f.kind for f in result.findings] == ["not-converged"]


def test_a_prandtl_cell_from_typed_properties_is_checked_at_the_film_of_its_user(tmp_path):
    """Pr = nu/alpha with nu typed at 0 degC: the Pr cell is compared at the film temperature of
    the Rayleigh number its Nusselt number reads (35 degC)."""
    p0 = stillair.gas_properties("air", 0.0)
    cells = _plate_chain(B12=p0.kinvisc, B13="=B12/B6",
                         C3="=(0.825+0.387*C2^(1/6)/(1+(0.492/B13)^(9/16))^(8/27))^2")
    result = check_hand_book(_book(tmp_path, cells))
    pr = next(r for r in result.recognised if r.cell == "Calc!B13")
    assert pr.form.quantity == "Pr"
    (finding,) = [f for f in result.findings if f.cell == "Calc!B13"]
    assert finding.kind == "property" and "35.0 degC" in finding.message


def test_the_readme_example_is_what_the_audit_prints(capsys):
    """README, "Auditing a hand-built workbook": the findings and the summary shown."""
    import os
    from pathlib import Path

    from stillair.addin.audit.check import main
    root = Path(__file__).resolve().parents[1]
    readme = (root / "README.md").read_text()
    block = readme.split("$ stillair audit tests/data/hand/pipe-0.xlsx\n")[1]
    shown = [line[4:] for line in block.split("\n\n")[0].splitlines()[1:]]   # after the header
    here = os.getcwd()
    os.chdir(root)
    try:
        assert main(["tests/data/hand/pipe-0.xlsx"]) == 1
    finally:
        os.chdir(here)
    printed = capsys.readouterr().out.splitlines()[1:]
    assert printed == shown


def test_a_sheet_kept_in_kelvin_is_not_taken_for_degc_mistakes(tmp_path):
    """Temperatures typed in kelvin: beta = 1/T and sigma eps (T1^4 - T2^4) are then right,
    and the typed properties are compared at the film temperature read as kelvin."""
    p = stillair.gas_properties("air", 35.0)
    cells = {"B1": 318.15, "B2": 298.15, "B3": 0.5, "B5": p.kinvisc, "B6": p.diffusivity,
             "B7": p.prandtl, "B8": p.conductivity, "B9": 0.9,
             "C1": "=2/(B1+B2)", "C2": "=9.80665*C1*(B1-B2)*B3^3/(B5*B6)",
             "C3": "=(0.825+0.387*C2^(1/6)/(1+(0.492/B7)^(9/16))^(8/27))^2",
             "C4": "=C3*B8/B3", "C7": "=5.670374419E-8*B9*(B1^4-B2^4)"}
    result = check_hand_book(_book(tmp_path, cells))
    assert not result.findings, result.findings
    ra = next(r for r in result.recognised if r.form.quantity == "Ra")
    assert any("read as kelvin" in s and "35.0 degC" in s for s in ra.statements)


def test_a_spent_search_budget_is_said_not_silent(tmp_path, monkeypatch):
    """With no budget left, the mistyped constant is not searched for, and the summary says
    which cells were not searched instead of calling them unrecognised and leaving it there."""
    from stillair.addin.audit import hand
    monkeypatch.setattr(hand, "SEARCH_BUDGET", 0)
    cells = dict(_plate_inputs(), C1="=9.80665*B4*(B1-B2)*B3^3/(B5*B6)",
                 C2="=(0.825+0.387*C1^(1/6)/(1+(0.429/B7)^(9/16))^(8/27))^2")
    result = check_hand_book(_book(tmp_path, cells))
    assert not result.findings
    assert result.unsearched == ["Calc!C2"]
    assert "1 not searched for a mistyped constant (search budget spent)" in result.summary()


def test_a_table_copied_down_is_recognised_row_by_row_from_its_first_row(tmp_path):
    """Rows of one relative form: each copy is checked at its own probes against the first
    row's form, so a row whose typed property is wrong is still found, and a row whose
    formula differs (L^2 typed for L^3) is identified on its own: the exponent is the
    mistyped constant."""
    p = stillair.gas_properties("air", 35.0)
    cells = {}
    for r in range(1, 7):
        cells.update({f"A{r}": 45.0, f"B{r}": 25.0, f"C{r}": 0.2 * r, f"D{r}": 1 / 308.15,
                      f"E{r}": p.kinvisc, f"F{r}": p.diffusivity,
                      f"G{r}": f"=9.80665*D{r}*(A{r}-B{r})*C{r}^3/(E{r}*F{r})"})
    cells["E4"] = stillair.air_kinvisc(0.0)            # row 4: nu typed at 0 degC
    cells["G6"] = "=9.80665*D6*(A6-B6)*C6^2/(E6*F6)"     # row 6: L squared
    result = check_hand_book(_book(tmp_path, cells))
    assert [r.cell for r in result.recognised] == [f"Calc!G{r}" for r in range(1, 7)]
    assert [(f.kind, f.cell) for f in result.findings] == [("property", "Calc!G4"),
                                                           ("constant", "Calc!G6")]
    assert "typed constant 2 is 3" in result.findings[1].message
