"""solar-collector: top-loss coefficient of a flat-plate solar collector with one or two covers.

Network per m² of absorber: absorber -(gas layer: tilted-cavity convection + grey radiation)-
cover 1 [-(gas layer)- cover 2] -(wind film h_w to ambient air, and radiation to the sky)-.
Klein's empirical top-loss equation stands beside it as a plain formula; since Klein's equation
takes the sky at the air temperature, the network is solved a second time that way (same
branches, other boundaries) for a like-for-like comparison.
"""

from __future__ import annotations

import stillair
from stillair.network import BRANCH_COLUMNS

from .book import TemplateBook
from .spec import OUTDOOR_AIR, SIGMA_TEXT, SKY_TEMPERATURE, Template, Valid, gas_pressure

GAP = Valid(0.0, 0.2, "a gap above 0; at most 0.2 m keeps the collector length / gap ratio within the tilted-"
            "cavity correlations (aspect 12 and up for Hollands)", low_open=True)
COVER_EMITTANCE = Valid(0.01, 1.0, "an emittance is at most 1, and at least 0.01 (the exchange factor "
                        "1/(1/e1 + 1/e2 - 1) needs both above 0)")

# Our own scenario: a selective absorber at 75 °C under one cover on a 35° roof, mild breeze.
DEFAULTS = dict(t_absorber=75.0, t_ambient=12.0, t_sky=0.0, wind_speed=2.5, tilt=35.0, covers=1,
                eps_absorber=0.12, eps_cover=0.88, gap_1=0.03, gap_2=0.025, collector_length=2.0,
                pressure=101325.0)


def network_rows(covers: int) -> list[list]:
    """Branch rows for one or two covers (the one-cover table padded with blank rows to the same
    length, so that CHOOSE can pick either)."""
    top = "cover-2" if covers == 2 else "cover-1"
    rows = [
        ["gap-1", "absorber", "cover-1", "cavity", "=gap_1", "=collector_length", 1.0, "=tilt", None, None],
        ["rad-1", "absorber", "cover-1", "radiation", "=eps_absorber", "=eps_cover", 1.0, None, None, None],
    ]
    if covers == 2:
        rows += [["gap-2", "cover-1", "cover-2", "cavity", "=gap_2", "=collector_length", 1.0, "=tilt", None, None],
                 ["rad-2", "cover-1", "cover-2", "radiation", "=eps_cover", "=eps_cover", 1.0, None, None, None]]
    rows += [["wind", top, "ambient", "film", "=h_wind", 1.0, None, None, None, None],
             ["sky", top, "sky", "radiation", "=eps_cover", None, 1.0, None, None, None]]
    return rows + [[None] * len(BRANCH_COLUMNS)] * (6 - len(rows))


def build(b: TemplateBook) -> None:
    d = DEFAULTS
    b.section("Inputs", "Operating conditions")
    b.input("t_absorber", "Mean absorber plate temperature", d["t_absorber"], "°C",
            valid=Valid(-60.0, 300.0, "from outdoor air temperatures up to 300 °C, beyond any stagnating "
                        "flat-plate absorber"))
    b.input("t_ambient", "Ambient air temperature", d["t_ambient"], "°C", valid=OUTDOOR_AIR)
    b.input("t_sky", "Effective sky temperature", d["t_sky"], "°C", "clear night sky: 10-30 K below the air",
            valid=SKY_TEMPERATURE)
    b.input("wind_speed", "Wind speed over the cover", d["wind_speed"], "m/s",
            valid=Valid(0.0, 15.0, "not negative; the linear wind coefficient is not used beyond about 15 m/s"))
    b.section("Inputs", "Collector")
    b.input("tilt", "Collector slope from the horizontal", d["tilt"], "°", "0 flat ... 90 vertical",
            valid=Valid(0.0, 90.0, "a collector slope lies from 0 (flat) to 90° (vertical)"))
    b.input("covers", "Number of glass covers", d["covers"], "-", choices=["1", "2"])
    b.input("eps_absorber", "Absorber emittance (long-wave)", d["eps_absorber"], "-",
            "selective 0.05-0.15, black paint 0.9-0.95", valid=COVER_EMITTANCE)
    b.input("eps_cover", "Cover emittance (glass)", d["eps_cover"], "-", "glass about 0.88", valid=COVER_EMITTANCE)
    b.input("gap_1", "Gap absorber - cover 1", d["gap_1"], "m", valid=GAP)
    b.input("gap_2", "Gap cover 1 - cover 2 (two covers only)", d["gap_2"], "m", "not used with one cover",
            valid=GAP)
    b.input("collector_length", "Collector length along the slope", d["collector_length"], "m",
            "cavity aspect ratio", valid=Valid(0.2, 10.0, "from 0.2 to 10 m: a flat-plate collector's length"))
    b.input("pressure", "Air pressure", d["pressure"], "Pa", "101325 at sea level", valid=gas_pressure())

    b.section("Calculation", "Outside coefficients")
    b.step("h_wind", "Wind coefficient h_w = 2.8 + 3.0 V", "=2.8+3.0*wind_speed", "W/(m²·K)",
           "Watmuff, Charters & Proctor (1977), as quoted by Duffie & Beckman (from memory)")
    b.step("sigma", "Stefan-Boltzmann constant", f"={SIGMA_TEXT}", "W/(m²·K⁴)", "CODATA 2018")
    b.section("Tables", "Network per m² of absorber, one cover (cover temperatures unknown)")
    b.branch_table("Tables", network_rows(1), "col_one_cover")
    b.section("Tables", "The same with two covers (the Number of glass covers picks the table)")
    b.branch_table("Tables", network_rows(2), "col_two_covers")
    b.section("Tables", "Boundaries: this sky, and the sky at the air temperature (Klein's assumption)")
    b.boundary_table("Tables", [["absorber", "T", "=t_absorber"], ["ambient", "T", "=t_ambient"],
                               ["sky", "T", "=t_sky"]], "col_bounds")
    b.blank("Tables")
    b.boundary_table("Tables", [["absorber", "T", "=t_absorber"], ["ambient", "T", "=t_ambient"],
                               ["sky", "T", "=t_ambient"]], "col_bounds_klein")
    b.section("Calculation", "Network solution (network tables on the sheet Tables)")
    air = '"air",pressure'
    branches = "CHOOSE(covers,col_one_cover,col_two_covers)"
    b.step("t_cover_1", "Cover 1 temperature", f'=NET_TEMP({branches},col_bounds,"cover-1",{air})', "°C")
    b.step("t_cover_top", "Outer cover temperature (cover 2, or cover 1 alone)",
           f'=NET_TEMP({branches},col_bounds,IF(covers=2,"cover-2","cover-1"),{air})', "°C")
    b.step("q_gap_1", "Convection absorber - cover 1", f'=NET_HEAT({branches},col_bounds,"gap-1",{air})', "W/m²")
    b.step("q_rad_1", "Radiation absorber - cover 1", f'=NET_HEAT({branches},col_bounds,"rad-1",{air})', "W/m²")
    b.step("q_top", "Top loss per m² of absorber", "=q_gap_1+q_rad_1", "W/m²")
    b.step("u_top", "Top-loss coefficient U_t = q/(T_p - T_a)", "=q_top/(t_absorber-t_ambient)", "W/(m²·K)")
    b.step("q_wind", "Loss to the air by the wind film", f'=NET_HEAT({branches},col_bounds,"wind",{air})', "W/m²")
    b.step("q_sky", "Loss to the sky by radiation", f'=NET_HEAT({branches},col_bounds,"sky",{air})', "W/m²")
    b.step("ra_1", "Gap 1 Rayleigh number", "=RAYLEIGH(t_absorber,t_cover_1,gap_1,\"air\",pressure)", "-",
           number_format="0.00E+00")
    b.step("pr_1", "Gap 1 Prandtl number", "=AIR_PRANDTL((t_absorber+t_cover_1)/2,pressure)", "-")
    b.step("h_gap_1", "Gap 1 convection coefficient at the solved cover temperature",
           '=H_CAVITY(t_absorber,t_cover_1,gap_1,collector_length,tilt,"air",pressure,"auto")', "W/(m²·K)",
           "check: h ΔT = convection absorber - cover 1")
    aspect = "collector_length/gap_1"
    b.step("nu_gap_1", "Gap 1 Nusselt number (auto)", f'=NU_CAVITY(ra_1,pr_1,{aspect},tilt,"auto")', "-")
    spread = f'NU_SPREAD("cavity",ra_1,pr_1,"",tilt,{aspect})'
    b.step("spread_count", "Correlations covering gap 1 (NU_SPREAD)", f"=INDEX({spread},1,3)", number_format="0")
    b.step("h_gap_low", "Gap 1 coefficient at the lowest covering Nu",
           f'=IF(spread_count>0,h_gap_1*INDEX({spread},1,1)/nu_gap_1,'
           '"no correlation covers the case")', "W/(m²·K)", "h scales with Nu at fixed properties")
    b.step("h_gap_high", "Gap 1 coefficient at the highest covering Nu",
           f'=IF(spread_count>0,h_gap_1*INDEX({spread},1,2)/nu_gap_1,'
           '"no correlation covers the case")', "W/(m²·K)")
    b.step("u_top_sky_air", "U_t with the sky at the air temperature (Klein's assumption)",
           f'=(NET_HEAT({branches},col_bounds_klein,"gap-1",{air})+NET_HEAT({branches},col_bounds_klein,'
           f'"rad-1",{air}))/(t_absorber-t_ambient)', "W/(m²·K)", "same branches, sky node at t_ambient")

    b.section("Calculation", "Klein's empirical top-loss equation (Duffie & Beckman eq. 6.4.9, from memory)")
    b.step("k_tp", "Absorber temperature T_pm", "=t_absorber+273.15", "K")
    b.step("k_ta", "Ambient temperature T_a", "=t_ambient+273.15", "K")
    b.step("k_f", "f = (1 + 0.089 h_w - 0.1166 h_w eps_p)(1 + 0.07866 N)",
           "=(1+0.089*h_wind-0.1166*h_wind*eps_absorber)*(1+0.07866*covers)", "-")
    b.step("k_c", "C = 520 (1 - 0.000051 beta²), beta at most 70°", "=520*(1-0.000051*MIN(tilt,70)^2)", "-")
    b.step("k_e", "e = 0.430 (1 - 100/T_pm)", "=0.43*(1-100/k_tp)", "-")
    b.step("k_conv", "Convective part {N/[(C/T_pm)((T_pm - T_a)/(N + f))^e] + 1/h_w}^-1",
           "=1/(covers/((k_c/k_tp)*((k_tp-k_ta)/(covers+k_f))^k_e)+1/h_wind)", "W/(m²·K)")
    b.step("k_rad", "Radiative part sigma(T_pm + T_a)(T_pm² + T_a²)/[...]",
           "=sigma*(k_tp+k_ta)*(k_tp^2+k_ta^2)/(1/(eps_absorber+0.00591*covers*h_wind)"
           "+(2*covers+k_f-1+0.133*eps_absorber)/eps_cover-covers)", "W/(m²·K)")
    b.step("u_klein", "U_t, Klein", "=k_conv+k_rad", "W/(m²·K)")

    b.section("Results", "Top loss")
    b.result("top_loss_u", "Top-loss coefficient U_t (network, this sky)", "=u_top", "W/(m²·K)")
    b.result("gap_h_low", "Gap 1 convection, correlation spread: lowest", "=h_gap_low", "W/(m²·K)",
             "at the solved cover temperature (see Notes)")
    b.result("gap_h_nominal", "Gap 1 convection, the network's correlation", "=h_gap_1", "W/(m²·K)")
    b.result("gap_h_high", "Gap 1 convection, correlation spread: highest", "=h_gap_high", "W/(m²·K)")
    b.result("top_loss_q", "Top loss per m² of absorber", "=q_top", "W/m²")
    b.result("cover_1_t", "Cover 1 temperature", "=t_cover_1", "°C")
    b.result("cover_2_t", "Cover 2 temperature", '=IF(covers=2,TEXT(t_cover_top,"0.0")&" °C","no second cover")',
             text=True)
    b.result("sky_share", "Share of the outside loss radiated to the sky", "=100*q_sky/(q_wind+q_sky)", "%")
    b.section("Results", "Beside Klein's empirical equation (sky at the air temperature)")
    b.result("top_loss_u_klein_case", "U_t, network with the sky at the air temperature", "=u_top_sky_air",
             "W/(m²·K)")
    b.result("klein_u", "U_t, Klein's equation", "=u_klein", "W/(m²·K)", "stated accuracy about +-0.3 W/(m²·K)")
    b.result("klein_difference", "Difference, network - Klein", "=top_loss_u_klein_case-klein_u", "W/(m²·K)")
    b.result("klein_note", "Klein's stated range",
             '=IF(OR(t_absorber>200,t_absorber<t_ambient,tilt>90),"outside: plate from ambient to 200 °C",'
             '"inside its stated range (plate from ambient to 200 °C, slope 0-90°)")', text=True,
             note="range from memory (Duffie & Beckman sec. 6.4)")
    b.section("Results", "Checks and validity notes")
    b.result("network_check", "Network", f'=NET_CHECK({branches},col_bounds,"air",pressure)', text=True)
    b.result("gap1_method", "Gap 1 correlation", '=CAVITY_METHOD(ra_1,pr_1,collector_length/gap_1,tilt,"auto")',
             text=True)
    b.result("gap1_note", "Gap 1 validity", '=NU_NOTE("cavity",ra_1,pr_1,"",tilt,collector_length/gap_1,"auto")',
             text=True)
    b.result("gap1_check", "Gap 1: h ΔT minus the network's convection", "=h_gap_1*(t_absorber-t_cover_1)-q_gap_1",
             "W/m²", "0 when consistent")
    b.caution("Results", "Caution: absorber and cover surfaces can be hot enough to burn, and a collector "
                         "without flow (stagnation) gets far hotter than in operation. Use the manufacturer's "
                         "ratings, local codes and licensed practice for design and safety.")

    cav = stillair.CORRELATIONS
    b.paragraph("Method. A thermal network per m² of absorber, solved to convergence: the absorber at its mean "
                "plate temperature; each gas layer is a cavity branch (convection across an air layer tilted at "
                "the collector slope, heated from below) in parallel with grey radiation between parallel faces; "
                "the outer cover loses heat by a wind film h_w to the ambient air and by radiation (emittance of "
                "glass) to the sky. U_t = top loss / (T_plate - T_ambient). Covers are thin glass: no conduction "
                "resistance and opaque to long-wave radiation.")
    b.paragraph("Wind: h_w = 2.8 + 3.0 V W/(m²·K) (Watmuff, Charters and Proctor 1977, as quoted by Duffie & "
                "Beckman, Solar Engineering of Thermal Processes, sec. 3.15; from memory). Other wind "
                "correlations give different h_w; the result is sensitive to it at one cover.")
    b.paragraph("Klein's empirical equation: S.A. Klein, Calculation of flat-plate collector loss coefficients, "
                "Solar Energy 17 (1975) 79-80, in the revised form quoted by Duffie & Beckman, Solar Engineering "
                "of Thermal Processes, eq. 6.4.9 (from memory): U_t = {N/[(C/T_pm)((T_pm - T_a)/(N + f))^e] + "
                "1/h_w}^-1 + sigma (T_pm + T_a)(T_pm² + T_a²)/{(eps_p + 0.00591 N h_w)^-1 + (2N + f - 1 + 0.133 "
                "eps_p)/eps_g - N}, f = (1 + 0.089 h_w - 0.1166 h_w eps_p)(1 + 0.07866 N), C = 520 (1 - 0.000051 "
                "beta²) for 0-70° (70° above), e = 0.430 (1 - 100/T_pm). It takes the sky at the air temperature "
                "and gaps of about 25 mm, so it is compared with the network solved with the sky at the air "
                "temperature; stated accuracy about +-0.3 W/(m²·K) (from memory).")
    used = sorted({str(stillair.cavity_method(ra, 0.7, 60.0, t)) for ra in (3.0e3, 3.0e4, 1.0e5)
                   for t in (0.0, 30.0, 45.0, 60.0)})
    b.spread_note("gap 1 convection coefficient")
    b.paragraph("Cavity correlations the automatic choice uses for tilted collector gaps:")
    for method in used:
        c = cav[("cavity", method)]
        b.paragraph(f"- cavity {method}: {c.title}. Source: {c.source}")
    b.paragraph("The Results sheet names the correlation used at these inputs and whether it is in its range.")
    b.paragraph("Assumptions: steady state; absorber isothermal at its mean temperature; no edge or back losses "
                "(add them separately); covers opaque to long-wave radiation; no solar absorption in the covers.")
    b.paragraph("Caution: burns and stagnation. Absorber and cover temperatures here are for the stated operating "
                "point; a stagnating collector (no flow, full sun) reaches much higher absorber temperatures. Defer "
                "to the manufacturer's ratings, local codes and licensed practice.", caution=True)


TEMPLATE = Template(
    name="solar-collector", version=4, title="Flat-plate collector top loss",
    summary="Top-loss coefficient of a flat-plate solar collector with one or two covers, beside Klein's "
            "empirical equation.",
    build=build)
