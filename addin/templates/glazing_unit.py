"""glazing-unit: centre-of-glass U-value of a double or triple insulating glass unit.

Two modes side by side:

(a) the glazing standard's declared-value procedure (EN 673): its Nu = A (Gr Pr)^n (method
    "en673"), 15 K across the gas space(s) at a mean of 283 K, radiation 4 sigma Tm^3 / (1/e1 +
    1/e2 - 1), h_e = 23 and h_i = 3.6 + 4.4 eps/0.837 W/(m²·K) -- closed-form steps;
(b) the actual indoor/outdoor conditions solved as a thermal network (outdoor film + radiation,
    panes, gas layers with their convection correlation and radiation, indoor natural convection
    + radiation), giving the surface temperatures; the indoor face is compared with the dew point.

A sweep of U against gap width for air, argon and krypton (mode a) marks the optimum gap per gas.
"""

from __future__ import annotations

from typing import Any

import stillair
from stillair.network import BRANCH_COLUMNS

from .book import TemplateBook, source_of
from .spec import (EMISSIVITY, FACE_PAIR_EMISSIVITY, FAILED, INK, OUTDOOR_AIR, SAND_EDGE, SIG3, SIGMA_TEXT,
                   SLATE, Template, Valid, gas_pressure)

GASES = ("air", "argon", "krypton", "xenon")
SWEEP_GASES = ("air", "argon", "krypton")
SWEEP_MM = tuple(range(6, 25))          # 6 ... 24 mm
GAP_METHODS = ("auto", "elsherbiny", "wright", "catton", "macgregor-emery", "en673")
PASSES = 3                              # explicit passes of the standard's gap-ΔT split (triple)

# Defaults: our own scenario, a 6-16-4 unit with 90 % argon and a low-e coating on face 3.
DEFAULTS: dict[str, Any] = dict(panes=2, pane_1=0.006, pane_2=0.004, pane_3=0.004, glass_k=1.0, gap_1=0.016, gas_1="argon",
                fill_1=0.9, gap_2=0.014, gas_2="argon", fill_2=0.9, eps_outdoor_face=0.837,
                eps_gap1_outer=0.837, eps_gap1_inner=0.04, eps_gap2_outer=0.837, eps_gap2_inner=0.04,
                eps_indoor_face=0.837, glass_height=1.3, pressure=101325.0, t_indoor=20.0, t_outdoor=-8.0,
                rh_indoor=55.0, h_outdoor=20.0, gap_method="auto")

PANE = Valid(0.0, 0.05, "a pane above 0 and at most 50 mm thick (laminated glass included)", low_open=True)
GAP = Valid(0.0, 0.1, "a gap above 0; at most 100 mm, beyond any sealed glazing unit, and the gas-layer "
            "correlations need the height/gap ratio they were measured for", low_open=True)
FILL = Valid(0.0, 1.0, "a mole fraction lies from 0 to 1")


def network_rows(panes: int) -> list[list]:
    """Branch rows of mode (b) for a double or triple unit (the double table padded with blank rows
    to the triple's length, so that CHOOSE can pick either)."""
    method = "=gap_method"
    indoor = "s6" if panes == 3 else "s4"
    rows: list[list[Any]] = [
        ["out-conv", "s1", "outdoor", "film", "=h_outdoor", 1.0, None, None, None, None],
        ["out-rad", "s1", "outdoor", "radiation", "=eps_outdoor_face", None, 1.0, None, None, None],
        ["pane-1", "s1", "s2", "conduction", "=pane_1", "=glass_k", 1.0, None, None, None],
        ["gap-1", "s2", "s3", "cavity", "=gap_1", "=glass_height", 1.0, 90.0, "=gas_mix_1", method],
        ["gap-1-rad", "s2", "s3", "radiation", "=eps_gap1_outer", "=eps_gap1_inner", 1.0, None, None, None],
        ["pane-2", "s3", "s4", "conduction", "=pane_2", "=glass_k", 1.0, None, None, None],
    ]
    if panes == 3:
        rows += [
            ["gap-2", "s4", "s5", "cavity", "=gap_2", "=glass_height", 1.0, 90.0, "=gas_mix_2", method],
            ["gap-2-rad", "s4", "s5", "radiation", "=eps_gap2_outer", "=eps_gap2_inner", 1.0, None, None, None],
            ["pane-3", "s5", "s6", "conduction", "=pane_3", "=glass_k", 1.0, None, None, None],
        ]
    rows += [
        ["in-conv", indoor, "indoor", "vplate", "=glass_height", 1.0, None, None, None, None],
        ["in-rad", indoor, "indoor", "radiation", "=eps_indoor_face", None, 1.0, None, None, None],
    ]
    return rows + [[None] * len(BRANCH_COLUMNS)] * (11 - len(rows))


def build(b: TemplateBook) -> None:
    d = DEFAULTS
    # ------------------------------------------------------------------ Inputs
    b.section("Inputs", "Glazing build, outdoor to indoor (faces numbered 1 = outdoor face)")
    b.input("panes", "Number of panes", d["panes"], "-", "2 = double, 3 = triple unit", choices=["2", "3"])
    b.input("pane_1", "Pane 1 (outdoor) thickness", d["pane_1"], "m", valid=PANE)
    b.input("pane_2", "Pane 2 thickness", d["pane_2"], "m", "the indoor pane of a double unit", valid=PANE)
    b.input("pane_3", "Pane 3 (indoor, triple only) thickness", d["pane_3"], "m", "not used with 2 panes",
            valid=PANE)
    b.input("glass_k", "Glass conductivity", d["glass_k"], "W/(m·K)", "soda-lime glass 1.0 (EN 673 value)",
            valid=Valid(0.1, 5.0, "glasses conduct about 0.5 to 1.5 W/(m·K); 0.1 to 5 admits any pane material"))
    b.input("gap_1", "Gap 1 width (between panes 1 and 2)", d["gap_1"], "m", valid=GAP)
    b.input("gas_1", "Gap 1 fill gas", d["gas_1"], "", "the rest of the fill is air", choices=GASES)
    b.input("fill_1", "Gap 1 fill fraction", d["fill_1"], "-", "mole fraction of the fill gas (0.9 = 90 %)",
            valid=FILL)
    b.input("gap_2", "Gap 2 width (triple only)", d["gap_2"], "m", "not used with 2 panes", valid=GAP)
    b.input("gas_2", "Gap 2 fill gas (triple only)", d["gas_2"], "", choices=GASES)
    b.input("fill_2", "Gap 2 fill fraction (triple only)", d["fill_2"], "-", valid=FILL)
    b.input("eps_outdoor_face", "Emissivity, face 1 (outdoor face)", d["eps_outdoor_face"], "-",
            "uncoated soda-lime glass 0.837 (EN 673)", valid=EMISSIVITY)
    b.input("eps_gap1_outer", "Emissivity, face 2 (gap 1, outer side)", d["eps_gap1_outer"], "-",
            valid=FACE_PAIR_EMISSIVITY)
    b.input("eps_gap1_inner", "Emissivity, face 3 (gap 1, inner side)", d["eps_gap1_inner"], "-",
            "low-e coating: 0.01-0.2 (manufacturer's declared value)", valid=FACE_PAIR_EMISSIVITY)
    b.input("eps_gap2_outer", "Emissivity, face 4 (gap 2, outer side; triple)", d["eps_gap2_outer"], "-",
            valid=FACE_PAIR_EMISSIVITY)
    b.input("eps_gap2_inner", "Emissivity, face 5 (gap 2, inner side; triple)", d["eps_gap2_inner"], "-",
            valid=FACE_PAIR_EMISSIVITY)
    b.input("eps_indoor_face", "Emissivity, indoor face (4 double / 6 triple)", d["eps_indoor_face"], "-",
            valid=EMISSIVITY)
    b.input("glass_height", "Height of the glazed area", d["glass_height"], "m",
            "cavity aspect and indoor natural convection in mode (b)",
            valid=Valid(0.1, 6.0, "from 0.1 to 6 m: glazed heights the gas-layer and vertical-plate "
                        "correlations cover"))
    b.input("pressure", "Gas pressure in the gaps and room", d["pressure"], "Pa", "101325 at sea level",
            valid=gas_pressure())
    b.section("Inputs", "Actual conditions, mode (b)")
    b.input("t_indoor", "Indoor air (and room surfaces) temperature", d["t_indoor"], "°C",
            valid=Valid(0.0, 50.0, "an occupied room lies between 0 and 50 °C"))
    b.input("t_outdoor", "Outdoor air (and surroundings) temperature", d["t_outdoor"], "°C", valid=OUTDOOR_AIR)
    b.input("rh_indoor", "Indoor relative humidity", d["rh_indoor"], "%", "in per cent here; the humid-air "
            "functions take it as a fraction (rh_indoor/100)",
            valid=Valid(0.0, 100.0, "a relative humidity lies above 0 and at most 100 %", low_open=True))
    b.input("h_outdoor", "Outdoor convective film coefficient (wind)", d["h_outdoor"], "W/(m²·K)",
            "convection only: outdoor radiation is a branch of its own",
            valid=Valid(0.0, 200.0, "a film coefficient is above 0; 200 W/(m²·K) exceeds storm winds",
                        low_open=True))
    b.input("gap_method", "Gap convection correlation, mode (b)", d["gap_method"], "",
            "auto picks the one whose range covers the case", choices=GAP_METHODS)

    # ------------------------------------------------------------------ Calculation
    b.section("Calculation", "Gas fills and constants")
    for k in (1, 2):
        b.step(f"gas_mix_{k}", f"Gap {k} gas (mixture text)",
               f'=IF(OR(gas_{k}="air",fill_{k}>=1),gas_{k},'
               f'gas_{k}&":"&ROUND(fill_{k},6)&", air:"&ROUND(1-fill_{k},6))', "",
               "mole fractions, rest air")
    b.step("sigma", "Stefan-Boltzmann constant", f"={SIGMA_TEXT}", "W/(m²·K⁴)", "CODATA 2018")

    b.section("Calculation", "(a) EN 673 standard conditions (declared centre-of-glass U-value)")
    b.step("std_h_e", "External coefficient h_e", "=23", "W/(m²·K)",
           b.unverified("EN 673 external coefficient h_e = 23 W/(m²·K)"))
    b.step("std_h_i", "Internal coefficient h_i = 3.6 + 4.4 eps/0.837", "=3.6+4.4*eps_indoor_face/0.837",
           "W/(m²·K)", b.unverified("EN 673 internal coefficient h_i = 3.6 + 4.4 eps/0.837 W/(m²·K)"))
    b.step("std_tm_k", "Mean gas temperature Tm", "=283", "K",
           b.unverified("EN 673 declared mean gas temperature 283 K"))
    b.step("std_mean", "Mean gas temperature", "=std_tm_k-273.15", "°C")
    b.step("std_dt", "Temperature difference across the gas space(s), total", "=15", "K",
           b.unverified("EN 673 declared temperature difference 15 K across the gas space(s), split "
                        "between the gaps of a triple unit in proportion to their resistances"))
    b.step("std_hr_1", "Gap 1 radiation 4 sigma Tm³/(1/e2 + 1/e3 - 1)",
           "=4*sigma*std_tm_k^3/(1/eps_gap1_outer+1/eps_gap1_inner-1)", "W/(m²·K)")
    b.step("std_hr_2", "Gap 2 radiation 4 sigma Tm³/(1/e4 + 1/e5 - 1)",
           "=4*sigma*std_tm_k^3/(1/eps_gap2_outer+1/eps_gap2_inner-1)", "W/(m²·K)", "used with 3 panes")
    b.step("std_glass_r", "Glass resistance sum(d)/k",
           "=(pane_1+pane_2+IF(panes=3,pane_3,0))/glass_k", "m²·K/W")
    for p in range(1, PASSES + 1):
        if p == 1:
            split = "=IF(panes=3,std_dt/2,std_dt)"
            note = "first pass: equal split"
        else:
            split = f"=std_dt*std_r1_p{p - 1}/(std_r1_p{p - 1}+std_r2_p{p - 1})"
            note = "ΔT split in proportion to the gap resistances of the previous pass"
        b.step(f"std_dt1_p{p}", f"Pass {p}: ΔT across gap 1", split, "K", note)
        b.step(f"std_dt2_p{p}", f"Pass {p}: ΔT across gap 2", f"=std_dt-std_dt1_p{p}", "K", "0 with 2 panes")
        for k in (1, 2):
            b.step(f"std_hg{k}_p{p}", f"Pass {p}: gap {k} gas coefficient (en673)",
                   f"=H_CAVITY(std_mean+std_dt{k}_p{p}/2,std_mean-std_dt{k}_p{p}/2,gap_{k},glass_height,90,"
                   f'gas_mix_{k},pressure,"en673")', "W/(m²·K)", "Nu = A (Gr Pr)^n, vertical")
        b.step(f"std_r1_p{p}", f"Pass {p}: gap 1 resistance 1/(h_g + h_r)", f"=1/(std_hg1_p{p}+std_hr_1)",
               "m²·K/W")
        b.step(f"std_r2_p{p}", f"Pass {p}: gap 2 resistance 1/(h_g + h_r)",
               f"=IF(panes=3,1/(std_hg2_p{p}+std_hr_2),0)", "m²·K/W", "0 with 2 panes")

    def u_after(p):
        return f"1/(1/std_h_e+1/std_h_i+std_glass_r+std_r1_p{p}+std_r2_p{p})"
    b.step("std_u", "U-value, standard conditions", "=" + u_after(PASSES), "W/(m²·K)")
    b.step("std_u_change", "Change of U in the last pass", "=std_u-" + u_after(PASSES - 1), "W/(m²·K)",
           "converged when near 0", number_format="0.0E+00")

    b.section("Tables", "(b) actual conditions: network per m² of glass, double unit (s1 = face 1 ...)")
    b.branch_table("Tables", network_rows(2), "glz_double")
    b.section("Tables", "(b) the same for a triple unit (the Number of panes picks the table)")
    b.branch_table("Tables", network_rows(3), "glz_triple")
    b.section("Tables", "(b) boundaries")
    b.boundary_table("Tables", [["outdoor", "T", "=t_outdoor"], ["indoor", "T", "=t_indoor"]], "glz_bounds")
    b.section("Calculation", "(b) solved temperatures (network tables on the sheet Tables)")
    tables = "CHOOSE(panes-1,glz_double,glz_triple),glz_bounds"
    air = '"air",pressure'
    net = f"{tables},{air}"
    b.step("t_face_1", "Outdoor face temperature (s1)", f'=NET_TEMP({tables},"s1",{air})', "°C")
    b.step("t_gap1_outer", "Gap 1 outer face temperature (s2)", f'=NET_TEMP({tables},"s2",{air})', "°C")
    b.step("t_gap1_inner", "Gap 1 inner face temperature (s3)", f'=NET_TEMP({tables},"s3",{air})', "°C")
    b.step("t_gap2_outer", "Gap 2 outer face temperature (s4, triple)",
           f'=NET_TEMP({tables},"s4",{air})', "°C", "indoor face with 2 panes")
    b.step("t_gap2_inner", "Gap 2 inner face temperature (s5, triple)",
           f'=NET_TEMP({tables},IF(panes=3,"s5","s4"),{air})', "°C", "indoor face with 2 panes")
    b.step("t_indoor_face", "Indoor face temperature", f'=NET_TEMP({tables},IF(panes=3,"s6","s4"),{air})', "°C")
    indoor_node = 'IF(panes=3,"s6","s4")'
    b.step("t_indoor_face_low", "Indoor face, all convection at the lowest covering Nu",
           f"=INDEX(NET_BAND({tables},{indoor_node},{air}),1,1)", "°C", "correlation spread (NET_BAND)")
    b.step("t_indoor_face_high", "Indoor face, all convection at the highest covering Nu",
           f"=INDEX(NET_BAND({tables},{indoor_node},{air}),1,2)", "°C")
    b.step("q_actual", "Heat flow per m², indoor to outdoor",
           f'=-(NET_HEAT({tables},"in-conv",{air})+NET_HEAT({tables},"in-rad",{air}))', "W/m²")
    b.step("act_u", "U-value, actual conditions", "=q_actual/(t_indoor-t_outdoor)", "W/(m²·K)")
    b.step("act_hg_1", "Gap 1 gas coefficient at the solved faces",
           "=H_CAVITY(t_gap1_outer,t_gap1_inner,gap_1,glass_height,90,gas_mix_1,pressure,gap_method)",
           "W/(m²·K)", "check: (h_g + h_r) ΔT = heat flow")
    b.step("act_hr_1", "Gap 1 radiation coefficient at the solved faces",
           "=H_RAD(t_gap1_outer,t_gap1_inner,eps_gap1_outer,eps_gap1_inner)", "W/(m²·K)")
    b.step("act_q_gap1", "Heat flow across gap 1 from these coefficients",
           "=(act_hg_1+act_hr_1)*(t_gap1_outer-t_gap1_inner)", "W/m²", "equals -q with heat flowing outward")
    b.step("act_ra_1", "Gap 1 Rayleigh number", "=RAYLEIGH(t_gap1_outer,t_gap1_inner,gap_1,gas_mix_1,pressure)",
           "-", number_format="0.00E+00")
    b.step("act_pr_1", "Gap 1 Prandtl number",
           "=GAS_PRANDTL(gas_mix_1,(t_gap1_outer+t_gap1_inner)/2,pressure)", "-")
    b.step("act_ra_2", "Gap 2 Rayleigh number (triple)",
           "=RAYLEIGH(t_gap2_outer,t_gap2_inner,gap_2,gas_mix_2,pressure)", "-", "0 with 2 panes",
           number_format="0.00E+00")
    b.step("act_pr_2", "Gap 2 Prandtl number (triple)",
           "=GAS_PRANDTL(gas_mix_2,(t_gap2_outer+t_gap2_inner)/2,pressure)", "-")

    b.section("Calculation", "Indoor humidity at the indoor face")
    b.step("t_dew", "Indoor dew point (frost point below 0 °C)", "=DEW_POINT(t_indoor,rh_indoor/100,pressure)",
           "°C", "Hyland-Wexler saturation pressure, ASHRAE Fundamentals 2017 ch. 1")
    b.step("dew_margin", "Indoor face minus dew point", "=t_indoor_face-t_dew", "K")
    b.step("face_rh", "Relative humidity of the room air at the indoor face",
           "=SURFACE_RH(t_indoor,rh_indoor/100,t_indoor_face,pressure)", "-",
           "1 or more: condensation; ISO 13788 takes 0.8 as the mould criterion")
    b.step("face_factor", "Temperature factor of the indoor face, f_Rsi",
           "=TEMP_FACTOR(t_indoor_face,t_indoor,t_outdoor)", "-", "ISO 13788: (face - outdoor)/(indoor - outdoor)")

    b.section("Calculation", "Temperature profile through the unit (air points drawn 10 mm off the faces)")
    x1, x2 = "pane_1*1000", "(pane_1+gap_1)*1000"
    x3 = "(pane_1+gap_1+pane_2)*1000"
    x4, x5 = "(pane_1+gap_1+pane_2+gap_2)*1000", "(pane_1+gap_1+pane_2+gap_2+pane_3)*1000"
    end = f"IF(panes=3,{x5},{x3})+10"
    # The printed table names each point once; a double unit's two triple-only rows stay empty.
    points: list[list[Any]] = [["outdoor air", -10.0, "=t_outdoor"], ["face 1", 0.0, "=t_face_1"],
              ["face 2", f"={x1}", "=t_gap1_outer"], ["face 3", f"={x2}", "=t_gap1_inner"],
              ['=IF(panes=3,"face 4","indoor face")', f"={x3}", "=IF(panes=3,t_gap2_outer,t_indoor_face)"],
              ['=IF(panes=3,"face 5","(triple only)")', f'=IF(panes=3,{x4},"")', '=IF(panes=3,t_gap2_inner,"")'],
              ['=IF(panes=3,"indoor face","(triple only)")', f'=IF(panes=3,{x5},"")',
               '=IF(panes=3,t_indoor_face,"")'],
              ["indoor air", f"={end}", "=t_indoor"]]
    first, _, last, _ = b.table("Calculation", ["point", "position mm", "temperature °C"], points,
                                name="glz_profile", col=1, formats=[None, "0.0", "0.0"])
    # The chart's points, beside the table and outside the printed grid: a double unit repeats its
    # indoor air point there, so the line has no gap in any viewer (text would plot as zero).
    chart_points: list[list[Any]] = [[-10.0, "=t_outdoor"], [0.0, "=t_face_1"], [f"={x1}", "=t_gap1_outer"], [f"={x2}", "=t_gap1_inner"],
                    [f"={x3}", "=IF(panes=3,t_gap2_outer,t_indoor_face)"],
                    [f"=IF(panes=3,{x4},{end})", "=IF(panes=3,t_gap2_inner,t_indoor)"],
                    [f"=IF(panes=3,{x5},{end})", "=IF(panes=3,t_indoor_face,t_indoor)"], [f"={end}", "=t_indoor"]]
    ws = b.sheet("Calculation").worksheet
    ws.set_column(6, 7, 20)
    for col, title in ((6, "chart: position mm"), (7, "chart: temperature °C")):
        ws.write(first - 1, col, title, b.fmt("header_number"))
    for row, point in enumerate(chart_points, start=first):
        for col, value in zip((6, 7), point):
            if isinstance(value, str):
                ws.write_formula(row, col, value, b.fmt("cell", "0.0"))
            else:
                ws.write_number(row, col, value, b.fmt("cell", "0.0"))
    b.chart("Calculation", "scatter", "Temperature through the unit, actual conditions (b)",
            [{"name": "temperature", "categories": "=" + TemplateBook.column("Calculation", first, last, 6),
              "values": "=" + TemplateBook.column("Calculation", first, last, 7),
              "marker": {"type": "circle", "size": 5}}],
            "position from the outdoor face, mm", "temperature, °C", subtype="straight_with_markers",
            height=370, with_previous=True)

    # ------------------------------------------------------------------ Results
    b.section("Results", "Centre-of-glass U-value")
    b.result("u_standard", "U, (a) EN 673 standard conditions", "=std_u", "W/(m²·K)",
             "declared-value conditions: 15 K across the gas, Tm 283 K, h_e 23, h_i 3.6+4.4 eps/0.837")
    b.result("u_actual", "U, (b) actual conditions (network)", "=act_u", "W/(m²·K)",
             "this indoor/outdoor case, gap correlation as chosen")
    b.result("u_difference", "Difference (b) - (a)", "=u_actual-u_standard", "W/(m²·K)")
    b.result("heat_loss", "Heat loss per m², actual conditions", "=q_actual", "W/m²")
    b.section("Results", "Surface temperatures and condensation, actual conditions (b)")
    b.result("indoor_face_t", "Indoor face temperature (centre of glass)", "=t_indoor_face", "°C")
    b.result("outdoor_face_t", "Outdoor face temperature", "=t_face_1", "°C")
    b.result("indoor_face_low", "Indoor face, correlation spread: lowest", "=t_indoor_face_low", "°C",
             "spread of the published correlations (see Notes)")
    b.result("indoor_face_high", "Indoor face, correlation spread: highest", "=t_indoor_face_high", "°C")
    b.result("indoor_dew_point", "Indoor dew point", "=t_dew", "°C", "DEW_POINT (Hyland-Wexler saturation)")
    b.result("dew_margin_result", "Margin above the dew point", "=dew_margin", "K")
    b.result("face_rh_result", "Relative humidity at the indoor face", "=face_rh", "-",
             "0.8 or more for long: mould likely (ISO 13788)")
    b.result("face_factor_result", "Temperature factor of the indoor face, f_Rsi", "=face_factor", "-",
             "compare with the f_Rsi,min of local practice")
    b.result("condensation_check", "Condensation check (centre of glass)",
             '=IF(NOT(ISNUMBER(dew_margin)),"' + FAILED + '",IF(dew_margin>0,"no condensation at the centre of '
             'glass, margin "&TEXT(dew_margin,"0.0")&" K","CONDENSATION: indoor face "&TEXT(-dew_margin,"0.0")&'
             '" K below the dew point"))', text=True, fails=("CONDENSATION",),
             note="edges and frames are colder: see the caution below")
    b.result("condensation_check_low", "Condensation check at the bottom of the spread",
             '=IF(NOT(ISNUMBER(t_indoor_face_low)),"' + FAILED + '",IF(t_indoor_face_low>t_dew,"no condensation '
             'at the centre of glass, margin "&TEXT(t_indoor_face_low-t_dew,"0.0")&" K","CONDENSATION: indoor '
             'face "&TEXT(t_dew-t_indoor_face_low,"0.0")&" K below the dew point"))', text=True,
             fails=("CONDENSATION",))
    b.section("Results", "Checks and validity notes")
    b.result("network_check", "Network (b)", f"=NET_CHECK({net})", text=True)
    b.result("gap1_method", "Gap 1 correlation used in (b)",
             "=CAVITY_METHOD(act_ra_1,act_pr_1,glass_height/gap_1,90,gap_method)", text=True)
    b.result("gap1_note", "Gap 1 validity, (b)",
             '=NU_NOTE("cavity",act_ra_1,act_pr_1,"",90,glass_height/gap_1,gap_method)', text=True)
    b.result("gap2_note", "Gap 2 validity, (b)",
             '=IF(panes=3,NU_NOTE("cavity",act_ra_2,act_pr_2,"",90,glass_height/gap_2,gap_method),'
             '"no gap 2 (double unit)")', text=True)
    b.result("energy_check", "Gap 1 heat flow from its coefficients + heat flow", "=act_q_gap1+q_actual",
             "W/m²", "0 when the network balances", number_format="0.0E+00")
    b.result("std_convergence", "Standard mode: change of U in the last ΔT pass", "=std_u_change", "W/(m²·K)",
             number_format="0.0E+00")
    b.caution("Results", "Caution: centre-of-glass values only. Edges, spacers and frames are colder than the "
                         "centre of the glass; condensation and mould start there. Check against local codes, "
                         "the manufacturer's declared data and licensed practice.")

    b.section("Tables", "U against gap width: double unit, standard conditions (a), this unit's panes "
                        "and gap-1 coatings, pure gases")
    start = b.sheets["Tables"].row + 1     # first data row (0-based) after the header
    sweep_rows = []
    for i, mm in enumerate(SWEEP_MM):
        sweep_row: list[float | str] = [float(mm)]
        for gas in SWEEP_GASES:
            sweep_row.append(f"=1/(1/std_h_e+1/std_h_i+(pane_1+pane_2)/glass_k+1/(H_CAVITY(std_mean+std_dt/2,"
                       f'std_mean-std_dt/2,A{start + i + 1}/1000,glass_height,90,"{gas}",pressure,"en673")+std_hr_1))')
        sweep_rows.append(sweep_row)
    first, _, last, _ = b.table("Tables", ["gap mm"] + [f"U {g}, W/(m²·K)" for g in SWEEP_GASES], sweep_rows,
                                name="gap_sweep", formats=["0", SIG3, SIG3, SIG3])
    assert first == start
    gaps = TemplateBook.column("Tables", first, last, 0)
    optimum_rows = []
    for j, gas in enumerate(SWEEP_GASES, start=1):
        u = TemplateBook.column("Tables", first, last, j)
        optimum_rows.append([gas, f"=SUMPRODUCT(({u}=MIN({u}))*{gaps})/SUMPRODUCT(({u}=MIN({u}))*1)",
                             f"=MIN({u})"])
    b.blank("Tables")
    o_first, _, o_last, _ = b.table("Tables", ["gas", "optimum gap mm", "lowest U W/(m²·K)"], optimum_rows,
                                    name="gap_optimum", formats=[None, "0", SIG3])
    series = []
    palette = {"air": "#7A8C99", "argon": SLATE, "krypton": SAND_EDGE}
    for j, gas in enumerate(SWEEP_GASES, start=1):
        series.append({"name": gas, "categories": "=" + gaps,
                       "values": "=" + TemplateBook.column("Tables", first, last, j),
                       "line": {"color": palette[gas], "width": 1.75}, "marker": {"type": "none"}})
    for j, gas in enumerate(SWEEP_GASES):
        optimum_row = o_first + j
        series.append({"name": f"optimum {gas}",
                       "categories": "=" + TemplateBook.column("Tables", optimum_row, optimum_row, 1),
                       "values": "=" + TemplateBook.column("Tables", optimum_row, optimum_row, 2),
                       "line": {"none": True},
                       "marker": {"type": "diamond", "size": 8, "fill": {"color": palette[gas]},
                                  "border": {"color": INK}}})
    b.chart("Results", "scatter", "Centre-of-glass U against gap width (EN 673 conditions)", series,
            "gap width, mm", "U, W/(m²·K)", subtype="straight")

    # ------------------------------------------------------------------ Notes
    cav = stillair.CORRELATIONS
    auto_default = str(stillair.nusselt("cavity", "auto", ra=5.0e3, pr=0.7, aspect=d["glass_height"] / d["gap_1"],
                                      tilt=90.0).method)
    b.paragraph("Method. (a) Standard conditions: the declared-value procedure of EN 673 (Glass in building - "
                "Determination of thermal transmittance (U value) - Calculation method), written out step by "
                "step: 1/U = 1/h_e + 1/h_i + sum(d/k) + sum over the gaps of 1/(h_g + h_r), with h_g = Nu k/s "
                "from the standard's Nu = A (Gr Pr)^n (vertical: A = 0.035, n = 0.38; Nu at least 1), gas "
                "properties at the mean gas temperature 283 K, 15 K across the gas space and h_r = 4 sigma Tm³ / "
                "(1/e1 + 1/e2 - 1); h_e = 23 and h_i = 3.6 + 4.4 eps/0.837 W/(m²·K) (the standard's constants: "
                "unverified, listed below). For a triple unit the 15 K are split between the two gaps in "
                "proportion to their resistances, iterated in explicit passes (the standard's procedure as "
                "recalled: unverified; the last pass's change of U is shown). Gas properties are the engine's (CoolProp-based mixing rules), "
                "not the standard's declared table, so U can differ from a catalogue by a few 0.01 W/(m²·K).")
    b.paragraph("(b) Actual conditions: a thermal network per m² of glass, solved to convergence by NET_SOLVE's "
                "engine: outdoor air -(film h_outdoor, and radiation of face 1 to surroundings at the outdoor "
                "air temperature)- face 1 -(pane conduction)- face 2 -(gas layer: cavity correlation + grey "
                "radiation between parallel faces)- face 3 ... indoor face -(natural convection of a vertical "
                "plate of the glazed height, and radiation to a room at the indoor air temperature)- indoor air. "
                "Gas properties at each branch's own mean temperature, re-evaluated every iteration.")
    b.paragraph("Dew point and surface humidity: DEW_POINT and SURFACE_RH with the vapour pressure of the room "
                "air, p_w = RH p_ws(t), and the saturation pressure p_ws of Hyland and Wexler (ASHRAE Trans. "
                "89(2A) (1983) 500-519, as printed in the ASHRAE Handbook - Fundamentals 2017 ch. 1 eqs. 5 "
                "and 6), over ice below 0.01 °C (a frost point there). The relative humidity at the indoor face "
                "is p_w / p_ws(face); ISO 13788 judges mould likely where it stays at 0.8 or above for some "
                "time (unverified, listed below) and condensation at 1. The temperature factor f_Rsi = "
                "(face - outdoor) / (indoor - outdoor) (ISO 13788) compares with the minimum local practice "
                "requires.")
    b.unverified("ISO 13788's mould criterion, a surface relative humidity of 0.8 held for some time")
    b.paragraph("The U-against-gap table uses mode (a) for a double unit built from panes 1 and 2 with the "
                "gap-1 coatings, pure air, argon and krypton; the optimum is the gap of the lowest tabulated U "
                "(1 mm steps). Below the optimum the gas conducts; above it, convection starts and U rises again.")
    b.spread_note("indoor face temperature, mode (b)")
    b.paragraph("Correlations used:")
    used = [("cavity", "en673"), ("cavity", auto_default), ("vplate", "churchill-chu")]
    for method in GAP_METHODS[1:]:
        if ("cavity", method) not in used:
            used.append(("cavity", method))
    for key in used:
        c = cav[key]
        role = {"en673": "mode (a), and mode (b) when chosen",
                auto_default: "mode (b) gaps, the auto choice at the default inputs"}.get(key[1], "mode (b) gaps when chosen")
        if key[0] == "vplate":
            role = "mode (b) indoor face"
        b.paragraph(f"- {key[0]} {key[1]} ({role}): {c.title}. Source: {source_of(key[0], key[1])}")
    b.paragraph("Radiation: grey parallel faces, exchange factor 1/(1/e1 + 1/e2 - 1); a face seeing large "
                "surroundings, factor e. Linearised h = F sigma (T1² + T2²)(T1 + T2) (H_RAD).")
    b.paragraph("Assumptions: centre of glass, one-dimensional heat flow; vertical glazing; gaps sealed and gas "
                "fill as stated (fills decay over the years); panes grey and opaque to long-wave radiation; no sun.")
    b.paragraph("Caution: condensation and mould. The check is for the centre of the glass only; the edge "
                "of glass, spacer and frame are colder and condense first. Curtains and deep reveals lower the "
                "indoor face temperature further. Defer to local codes, the manufacturer's declared U-values and "
                "licensed practice.", caution=True)


TEMPLATE = Template(
    name="glazing-unit", version=6, title="Insulating glass unit",
    summary="Centre-of-glass U-value of double or triple glazing: EN 673 conditions and actual conditions, "
            "condensation check, U against gap width.",
    build=build)
