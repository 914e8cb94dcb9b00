"""Template: base temperature of a natural-convection plate-fin heat sink for a given dissipation.

HEATSINK_TBASE solves the base temperature at which the sink rejects the dissipation; the
Calculation sheet then re-computes every part of the heat-sink model from that temperature with
H_CHANNEL, H_VPLATE and the fin formulas written out, so a checker can follow each one and see
the heat balance close.  The correlation spread (NU_SPREAD for the channels and the outer faces)
re-runs the written-out model with the lowest and the highest covering Nusselt numbers.  A sweep
of the fin count (HEATSINK_TBASE per row, sheet Tables) shows where adding fins stops helping,
with CHANNEL_SPACING's thin-plate optimum beside it.
"""

from __future__ import annotations

from .book import limit_check
from .spec import (EMISSIVITY, FAILED, INK, LIMIT_TEMPERATURE, SAND_EDGE, SIG3, SIGMA_TEXT, Template, Valid,
                   altitude, gas_temperature)

NAME = "finned-heatsink"
SWEEP_ROWS = 20
MIN_GAP = 0.002  # m: narrower gaps are not swept (impractical in still air; common practice)
MAX_FINS = 200
NO_SPREAD = "no correlation covers the case"

DEFAULTS = dict(base_width=0.10, fin_height=0.035, fin_length=0.12, fin_thickness=0.0015, fin_count=12.0,
                fin_k=200.0, emissivity=0.85, dissipation=25.0, ambient_t=35.0, max_base_t=85.0, altitude=0.0)

_SINK = "base_width, fin_height, fin_length, fin_thickness, {count}, fin_k, emissivity, \"air\", air_pressure"

SIZE = Valid(0.0, 1.0, "a size above 0 and at most 1 m (larger sinks leave the laminar range of the "
             "correlations, Ra_L up to 1e9, at ordinary temperature differences)", low_open=True)
# a whole number of fins, and fins thinner than the gap they leave: conditions on other inputs
FIN_COUNT = Valid(2.0, float(MAX_FINS), "a heat sink has a whole number of fins, at least 2 (one channel "
                  f"between them); {MAX_FINS} is far beyond any still-air sink",
                  extra=("{cell}=INT({cell})", "{cell}*fin_thickness<base_width"),
                  extra_words="a whole number, with the fins fitting on the base")
FIN_THICKNESS = Valid(0.0, 0.02, "a fin is above 0 and at most 20 mm thick, and thinner than the gap it "
                      "leaves: (base width - N t)/(N - 1) > t", low_open=True,
                      extra=("{cell}*(2*fin_count-1)<base_width",),
                      extra_words="and thinner than the gap between the fins")


# The written-out fin model, one formula text each: the steps and the spread table evaluate the
# same model with other coefficients.
def _fin_m(h: str) -> str:
    return f"SQRT({h}*2*(fin_length+fin_thickness)/(fin_k*fin_length*fin_thickness))"


def _fin_efficiency(m: str) -> str:
    return f"TANH({m}*fin_lc)/({m}*fin_lc)"


def _outer_fin_h(h_gap: str, h_face: str) -> str:
    return f"({h_gap}+{h_face})/2"


def _q_fins(h_gap: str, eta_inner: str, eta_outer: str, h_outer: str) -> str:
    return f"((fin_count-2)*{eta_inner}*{h_gap}+2*{eta_outer}*{h_outer})*fin_area*excess"


def _q_base(h_gap: str) -> str:
    return f"(fin_count-1)*gap*fin_length*{h_gap}*excess"


def build(b) -> None:
    d = DEFAULTS
    # ------------------------------------------------------------------ Inputs
    b.section("Inputs", "Heat sink (fins vertical, base vertical)")
    b.input("base_width", "Base width across the fins", d["base_width"], "m", valid=SIZE)
    b.input("fin_height", "Fin height (base to tip)", d["fin_height"], "m", valid=SIZE)
    b.input("fin_length", "Fin length along the vertical flow", d["fin_length"], "m",
            "the sink's height as mounted", valid=SIZE)
    b.input("fin_thickness", "Fin thickness", d["fin_thickness"], "m", "thinner than the gap between fins",
            valid=FIN_THICKNESS)
    b.input("fin_count", "Number of fins", d["fin_count"], "-", "whole number >= 2", valid=FIN_COUNT)
    b.section("Inputs", "Material and finish")
    b.input("fin_k", "Fin conductivity", d["fin_k"], "W/(m·K)", "aluminium alloys about 150-220, copper about 390",
            valid=Valid(0.0, 500.0, "above 0; no fin material conducts more than about 500 W/(m·K)",
                        low_open=True))
    b.input("emissivity", "Surface emissivity (finish)", d["emissivity"], "-",
            "anodised or painted about 0.8-0.9, bare aluminium about 0.05-0.1", valid=EMISSIVITY)
    b.section("Inputs", "Load and surroundings")
    b.input("dissipation", "Heat to reject", d["dissipation"], "W", "component losses conducted into the base",
            valid=Valid(0.0, 1000.0, "a heat to reject is above 0 (no buoyancy without it); a still-air sink "
                        "rejects at most a few hundred W (common practice)", low_open=True))
    b.input("ambient_t", "Ambient air temperature", d["ambient_t"], "°C",
            "air around the sink, surroundings at the same temperature", valid=gas_temperature("air"))
    b.input("max_base_t", "Maximum allowed base temperature", d["max_base_t"], "°C",
            "from the component maker's rating less the component-to-base rise", valid=LIMIT_TEMPERATURE)
    b.input("altitude", "Site altitude", d["altitude"], "m", "sets the air pressure (standard atmosphere)",
            valid=altitude())

    # ------------------------------------------------------------------ Calculation
    sink = _SINK.format(count="fin_count")
    b.section("Calculation", "Geometry and air pressure")
    b.step("air_pressure", "Air pressure at the site", "=ALTITUDE_PRESSURE(altitude)", "Pa")
    b.step("gap", "Gap between fins S = (W - N t)/(N - 1)", "=(base_width-fin_count*fin_thickness)/(fin_count-1)",
           "m", number_format="0.00000")
    b.section("Calculation", "Base temperature (solved)")
    b.step("t_base", "Base temperature at which the sink rejects the dissipation",
           f"=HEATSINK_TBASE(dissipation, ambient_t, {sink})", "°C", "HEATSINK_TBASE: brentq on HEATSINK_Q")
    b.step("excess", "Base excess over ambient", "=t_base-ambient_t", "K")
    b.section("Calculation", "Convection coefficients at the solved base temperature")
    b.step("h_gap", "Channel coefficient (isothermal walls)",
           '=H_CHANNEL(t_base, ambient_t, gap, fin_length, "isothermal", "air", air_pressure)', "W/(m²·K)",
           "Bar-Cohen-Rohsenow, properties at the film temperature")
    b.step("h_face", "Outer fin faces (free vertical plate)",
           '=H_VPLATE(t_base, ambient_t, fin_length, "air", air_pressure)', "W/(m²·K)")
    b.step("ra_gap", "Rayleigh number on the gap", '=RAYLEIGH(t_base, ambient_t, gap, "air", air_pressure)', "-",
           number_format="0.00E+00")
    b.step("ra_face", "Rayleigh number on the fin length (outer faces)",
           '=RAYLEIGH(t_base, ambient_t, fin_length, "air", air_pressure)', "-", number_format="0.00E+00")
    b.step("pr_film", "Prandtl number at the film temperature", "=AIR_PRANDTL((t_base+ambient_t)/2, air_pressure)",
           "-")
    b.step("elenbaas", "Elenbaas number Ra_S S/L", "=ra_gap*gap/fin_length", "-", "optimum near 54")
    b.section("Calculation", "Fins: efficiency tanh(m Lc)/(m Lc), corrected length Lc = H + t/2")
    b.step("fin_lc", "Corrected fin length", "=fin_height+fin_thickness/2", "m", number_format="0.00000")
    b.step("fin_area", "Area of one fin, P Lc, P = 2 (L + t)", "=2*(fin_length+fin_thickness)*fin_lc", "m²",
           number_format=SIG3)
    b.step("m_inner", "Fin parameter m, inner fins", "=" + _fin_m("h_gap"), "1/m", number_format=SIG3)
    b.step("eta_inner", "Fin efficiency, inner fins", "=" + _fin_efficiency("m_inner"), "-")
    b.step("h_outer_fin", "Mean coefficient of an outer fin (one face in a gap, one free)",
           "=" + _outer_fin_h("h_gap", "h_face"), "W/(m²·K)")
    b.step("m_outer", "Fin parameter m, outer fins", "=" + _fin_m("h_outer_fin"), "1/m", number_format=SIG3)
    b.step("eta_outer", "Fin efficiency, outer fins", "=" + _fin_efficiency("m_outer"), "-")
    b.section("Calculation", "Heat split")
    b.step("q_fins", "Convection from the fins", "=" + _q_fins("h_gap", "eta_inner", "eta_outer", "h_outer_fin"),
           "W")
    b.step("q_base", "Convection from the base between the fins", "=" + _q_base("h_gap"), "W")
    b.step("open_area", "Openings of one channel (front S L, ends 2 S H)", "=gap*fin_length+2*gap*fin_height",
           "m²", number_format=SIG3)
    b.step("eps_open", "Apparent emissivity of a channel's openings",
           "=emissivity/(emissivity+(1-emissivity)*open_area/((2*fin_height+gap)*fin_length))", "-",
           "grey isothermal groove, uniform radiosity")
    b.step("sigma", "Stefan-Boltzmann constant", f"={SIGMA_TEXT}", "W/(m²·K⁴)", "CODATA 2018")
    b.step("q_rad", "Radiation from the envelope (tips, outer faces, channel openings)",
           "=sigma*(emissivity*(fin_count*fin_thickness+2*fin_height)*fin_length"
           "+eps_open*(fin_count-1)*open_area)*((t_base+273.15)^4-(ambient_t+273.15)^4)", "W")
    b.step("q_sum", "Heat rejected, sum of the parts", "=q_fins+q_base+q_rad", "W")
    b.step("balance", "Energy balance: dissipation - heat rejected", "=dissipation-q_sum", "W", "should be ~0",
           number_format="0.0E+00")
    b.step("q_check", "Check: HEATSINK_Q at the solved base temperature", f"=HEATSINK_Q(t_base, ambient_t, {sink})",
           "W", "equals the dissipation")

    b.section("Calculation", "Correlation spread (NU_SPREAD): the model at the lowest and highest covering Nu")
    spread_gap = 'NU_SPREAD("channel", ra_gap, pr_film, "isothermal", , fin_length/gap)'
    spread_face = 'NU_SPREAD("vplate", ra_face, pr_film)'
    b.step("count_gap", "Channel correlations covering the case", f"=INDEX({spread_gap}, 1, 3)",
           number_format="0")
    b.step("count_face", "Vertical-plate correlations covering the outer faces", f"=INDEX({spread_face}, 1, 3)",
           number_format="0")
    b.step("nu_gap", "Channel Nusselt number used (auto)",
           '=NU_CHANNEL(ra_gap, pr_film, fin_length/gap, "isothermal")', "-")
    b.step("nu_face", "Outer-face Nusselt number used (auto)", "=NU_VPLATE(ra_face, pr_film)", "-")
    b.step("g_sink", "Slope of the sink's heat rejection dQ/dT at the solved base temperature",
           f"=HEATSINK_Q(t_base+0.5, ambient_t, {sink})-HEATSINK_Q(t_base-0.5, ambient_t, {sink})", "W/K",
           "central difference over 1 K")
    sheet = "Calculation"
    start = b.sheets[sheet].row + 1
    labels = ["Channel coefficient h, W/(m²·K)", "Outer-face coefficient, W/(m²·K)", "m, inner fins, 1/m",
              "Fin efficiency, inner", "Mean coefficient, outer fin, W/(m²·K)", "m, outer fins, 1/m",
              "Fin efficiency, outer",
              "Heat rejected at the solved base temperature, W",
              "Base temperature, one Newton step, °C"]

    def ref(k, col):
        return b.cell(sheet, start + k, col)

    covered = "AND(count_gap>0, count_face>0)"

    def column(col, extreme):
        h, hf, mi, ei, ho, mo, eo, q = (ref(k, col) for k in range(8))
        rows = [_fin_m(h), _fin_efficiency(mi), _outer_fin_h(h, hf), _fin_m(ho), _fin_efficiency(mo),
                f"{_q_fins(h, ei, eo, ho)}+{_q_base(h)}+q_rad"]
        return ([f'=IF(count_gap>0, h_gap*INDEX({spread_gap}, 1, {extreme})/nu_gap, "{NO_SPREAD}")',
                 f'=IF(count_face>0, h_face*INDEX({spread_face}, 1, {extreme})/nu_face, "{NO_SPREAD}")']
                + [f'=IF({covered}, {row}, "-")' for row in rows]
                + [f'=IF({covered}, t_base+(dissipation-{q})/g_sink, "{NO_SPREAD}")'])

    low, high = column(2, 1), column(3, 2)
    first, _, last, _ = b.table(sheet, ["quantity", "lowest Nu", "highest Nu"],
                                [[label, low[k], high[k]] for k, label in enumerate(labels)], col=1,
                                formats=[None, SIG3, SIG3])
    assert first == start
    b.step("t_base_hot", "Base temperature, all convection at the lowest covering Nu",
           "=" + ref(8, 2), "°C")
    b.step("t_base_cool", "Base temperature, all convection at the highest covering Nu",
           "=" + ref(8, 3), "°C")

    b.section("Calculation", "Optimum spacing, fin-count sweep (sheet Tables) and validity")
    b.step("gap_opt", "Thin-plate optimum gap (most heat per width), CHANNEL_SPACING",
           '=CHANNEL_SPACING(t_base, ambient_t, fin_length, "isothermal", "array", "air", air_pressure)', "m",
           number_format="0.00000")
    b.step("count_opt", "Fin count giving about that gap",
           "=MAX(2, ROUND((base_width+gap_opt)/(gap_opt+fin_thickness), 0))", "fins", number_format="0")
    b.step("count_max", f"Largest fin count with a gap of at least {MIN_GAP * 1000:g} mm",
           f"=MAX(3, INT((base_width+{MIN_GAP})/(fin_thickness+{MIN_GAP})))", "fins", number_format="0")
    b.step("count_first", f"First count of the sweep ({SWEEP_ROWS} counts around that count)",
           f"=MAX(2, MIN(count_opt-{SWEEP_ROWS // 2 - 1}, count_max-{SWEEP_ROWS - 1}))", "fins",
           number_format="0")
    tables = "Tables"
    b.section(tables, f"Fin-count sweep: {SWEEP_ROWS} whole counts around the thin-plate optimum, the rest "
                      "as on Inputs")
    sweep_start = b.sheets[tables].row + 1
    rows = []
    for k in range(SWEEP_ROWS):
        row = sweep_start + k
        count, temp = b.cell(tables, row, 1), b.cell(tables, row, 3)
        rows.append([f"=MIN(count_first+{k}, count_max)",
                     f"=1000*(base_width-{count}*fin_thickness)/({count}-1)",
                     f"=HEATSINK_TBASE(dissipation, ambient_t, {_SINK.format(count=count)})",
                     "=max_base_t",
                     f"=max_base_t-{temp}",
                     limit_check(temp, "max_base_t", "yes", "no")])
    first, _, last, _ = b.table(tables, ["fin count", "gap mm", "base °C", "limit °C", "margin K",
                                         "within limit"], rows, name="fin_sweep", col=1,
                                formats=["0", "0.00", "0.0", "0.0", "0.0", None])
    assert first == sweep_start
    b.verdicts(tables, first, 6, last, fails=("no",))
    counts, temps = b.column(tables, first, last, 1), b.column(tables, first, last, 3)
    limits = b.column(tables, first, last, 4)
    b.step("t_best", "Lowest base temperature of the sweep", f"=MIN({temps})", "°C")
    b.step("count_best", "Fin count with the lowest base temperature",
           f"=INDEX({counts}, MATCH(t_best, {temps}, 0))", "fins", number_format="0")
    b.step("best_where", "Where the lowest lies",
           f'=IF(OR(AND(count_best>{b.cell(tables, first, 1)}, count_best<{b.cell(tables, last, 1)}), '
           'count_best=2, count_best=count_max), "a true optimum (or the end of the possible counts)", '
           '"at the edge of the sweep: the optimum may lie beyond it")', "")
    b.step("note_gap", "Validity of the channel correlation",
           '=NU_NOTE("channel", ra_gap, pr_film, "isothermal", , fin_length/gap)', "")
    b.step("note_face", "Validity of the outer-face correlation", '=NU_NOTE("vplate", ra_face, pr_film)', "")

    # ------------------------------------------------------------------ Results
    b.section("Results", "Base temperature")
    b.result("res_t_base", "Base temperature", "=t_base", "°C")
    b.result("res_limit", "Maximum allowed base temperature", "=max_base_t", "°C")
    b.result("res_margin", "Margin to the limit (limit - base)", "=max_base_t-t_base", "K")
    b.result("res_check", "Limit check", limit_check("t_base", "max_base_t"), text=True, fails=("EXCEEDS LIMIT",))
    b.result("res_t_base_cool", "Base temperature, correlation spread: lowest", "=t_base_cool", "°C",
             "spread of the published correlations (see Notes)")
    b.result("res_t_base_hot", "Base temperature, correlation spread: highest", "=t_base_hot", "°C")
    b.result("res_check_hot", "Limit check at the top of the spread",
             limit_check("t_base_hot", "max_base_t",
                         failed=f'IF(t_base_hot="{NO_SPREAD}", "{NO_SPREAD}: no spread", "{FAILED}")'),
             text=True, fails=("EXCEEDS LIMIT",))
    b.section("Results", "Heat split")
    b.result("res_q_fins", "Fins (convection)", "=q_fins", "W")
    b.result("res_q_base", "Exposed base (convection)", "=q_base", "W")
    b.result("res_q_rad", "Radiation from the envelope", "=q_rad", "W")
    b.result("res_rad_share", "Radiation share", "=100*q_rad/q_sum", "%")
    b.result("res_balance", "Energy balance residual (dissipation - sum)", "=balance", "W",
             number_format="0.0E+00")
    b.section("Results", "Fin count")
    b.result("res_gap", "Gap between fins", "=gap", "m", number_format="0.00000")
    b.result("res_gap_opt", "Thin-plate optimum gap (Bar-Cohen and Rohsenow)", "=gap_opt", "m",
             number_format="0.00000")
    b.result("res_count_best", "Fin count with the lowest base temperature (sweep)", "=count_best", "fins",
             number_format="0")
    b.result("res_t_best", "Base temperature at that count", "=t_best", "°C")
    b.result("res_best_where", "Where the lowest lies", "=best_where", text=True)
    b.result("res_eta", "Fin efficiency (inner fins)", "=eta_inner", "-")
    b.section("Results", "Validity")
    b.result("res_note_gap", "Channel correlation", "=note_gap", text=True)
    b.result("res_note_face", "Outer-face correlation", "=note_face", text=True)
    b.caution("Results", "Caution: a heat sink at these temperatures can burn - guard or label it. Check the "
                         "component makers' ratings; derate near other heat sources and inside enclosures; "
                         "follow licensed practice (see Notes).")
    b.chart("Results", "scatter", "Base temperature against fin count (sweep on sheet Tables)",
            [{"name": "base temperature", "categories": f"={counts}", "values": f"={temps}",
              "marker": {"type": "circle", "size": 5}, "line": {"width": 1.5}},
             {"name": "allowed base temperature", "categories": f"={counts}", "values": f"={limits}",
              "marker": {"type": "none"}, "line": {"dash_type": "dash"}},
             {"name": "lowest (optimum count)", "categories": f"={b.names['count_best']}",
              "values": f"={b.names['t_best']}", "marker": {"type": "diamond", "size": 11, "fill": {"color": INK},
                                                   "border": {"color": INK}},
              "line": {"none": True}},
             {"name": "this design", "categories": f"={b.names['fin_count']}",
              "values": f"={b.names['t_base']}", "marker": {"type": "square", "size": 9, "fill": {"none": True},
                                                   "border": {"color": SAND_EDGE, "width": 2}},
              "line": {"none": True}}],
            "number of fins", "base temperature °C", subtype="straight_with_markers")

    # ------------------------------------------------------------------ Notes
    b.section("Notes", "Method")
    b.paragraph("The base is vertical and mounted on the equipment (its back face loses nothing); the N fins "
                "are vertical, of height H, length L along the rising air and thickness t, at a uniform gap "
                "S = (W - N t)/(N - 1). Each gap is an open vertical channel with isothermal walls, h from "
                "the Bar-Cohen-Rohsenow composite (H_CHANNEL), gas properties at the film temperature of "
                "base and ambient. The base strip between two fins takes the same h. The two outer fin faces "
                "see free air (vertical plate, H_VPLATE); an outer fin uses the mean of its two h.")
    b.paragraph("Fins: straight rectangular fins, efficiency tanh(m Lc)/(m Lc) with m = sqrt(h P/(k A_c)), "
                "P = 2 (L + t), A_c = L t, the tip's convection folded into the corrected length Lc = H + t/2 "
                "(Incropera et al., Fundamentals of Heat and Mass Transfer, 6th ed., eqs. 3.89, 3.92 and "
                "3.94; the equation numbers unverified).")
    b.unverified("the equation numbers 3.89, 3.92 and 3.94 of Incropera et al., 6th ed., for the fin "
                 "efficiency and the corrected length")
    b.paragraph("Radiation: from the sink's envelope (the fin tips, the two outer fin faces and the openings "
                "of the channels at the front, top and bottom) to surroundings at the ambient temperature, the "
                "whole sink taken at the base temperature. A channel's openings radiate with the apparent "
                "emissivity of a grey isothermal groove of uniform radiosity, eps / (eps + (1 - eps) "
                "A_open/A_walls).")
    b.paragraph("HEATSINK_TBASE finds the base temperature at which fins + base + radiation equal the "
                "dissipation (brentq root of HEATSINK_Q); the Calculation sheet re-computes each part from "
                "it, and the balance row shows the sum closing on the dissipation. The sweep on the sheet "
                f"Tables repeats the solve for {SWEEP_ROWS} whole fin counts around the count that gives the "
                "thin-plate optimum gap, everything else unchanged (where fewer counts fit, the last repeats); "
                "the lowest base temperature among them marks the optimum count, and Results says whether it "
                "lies inside the sweep. CHANNEL_SPACING gives the thin-plate optimum "
                "gap for comparison (fin thickness moves the real optimum).")
    b.spread_note("base temperature")
    b.paragraph("Here the spread scales the channel coefficient by NU_SPREAD's lowest and highest channel "
                "Nusselt number over the one used (Bar-Cohen-Rohsenow and Elenbaas cover symmetric isothermal "
                "channels inside Elenbaas' range; outside it one correlation covers the case and the channel's "
                "spread is nil) and the outer-face coefficient likewise with the vertical-plate correlations, "
                "re-computes the fins and the heat rejected at the solved base temperature, and moves the base "
                "temperature by one Newton step (the heat missing or in excess divided by the sink's slope "
                "dQ/dT): a first-order estimate, close for a spread of a few per cent. Where no correlation "
                "covers the channels or the outer faces, the sheet says so instead of giving a spread.")
    b.section("Notes", "Correlations used (sources from the stillair registry)")
    b.cite("Gaps between fins, Bar-Cohen and Rohsenow", "channel", "bar-cohen-rohsenow")
    b.cite("Gaps between fins, Elenbaas (in the spread)", "channel", "elenbaas")
    b.cite("Outer fin faces, Churchill-Chu", "vplate", "churchill-chu")
    b.cite("Outer fin faces, Churchill-Chu laminar form (in the spread)", "vplate", "churchill-chu-laminar")
    b.cite("Outer fin faces, McAdams (in the spread)", "vplate", "mcadams")
    b.section("Notes", "Assumptions and limits")
    b.paragraph("Fins vertical, sink alone in still air: no enclosure around it, no neighbouring hot parts, "
                "no sun, no draught. Laminar channels. The base is isothermal (no spreading resistance from "
                "a small component on a large base). Fin efficiency should be high (above about 0.9): the "
                "radiation taken at the base temperature is overstated for poor fins. The channel model "
                "ignores the base as a third wall and the open fin-tip side.")
    b.section("Notes", "Cautions")
    b.paragraph("Surfaces hot to touch: a base above about 50-60 °C can burn on contact; guard or label the "
                "sink and check touch limits against ISO 13732-1 or local rules.", caution=True)
    b.paragraph("Derating: another heat source nearby, a sink inside an enclosure or cabinet, a partly "
                "blocked inlet or outlet, dust, or a sink mounted with the fins horizontal all reject less "
                "heat than this model shows. An enclosure also raises the air around the sink above the room "
                "ambient: use the air temperature inside it. The component temperature is higher than the base "
                "by the component's own internal and interface resistances.", caution=True)
    b.paragraph("This is an engineering estimate from published correlations (natural-convection "
                "correlations are commonly quoted to about +/-15-20 %; common practice). Defer to the component makers' ratings and heat-sink makers' data, "
                "the applicable standards and licensed practice before relying on a result.", caution=True)


TEMPLATE = Template(NAME, 3, "Finned heat sink",
                    "Base temperature of a natural-convection plate-fin heat sink with vertical fins for a "
                    "given dissipation and ambient, with the heat split and a fin-count sweep.", build)
