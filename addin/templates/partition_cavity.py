"""Template: heat flow through a closed air cavity in a partition between two air spaces.

air - surface - board - cavity - board - surface - air, solved to convergence as a network
(every coefficient at its own film temperature and temperature difference), and beside it the
single-pass hand estimate: guessed surface temperatures, all properties at one guessed
temperature, each coefficient computed once, no iteration.  The Results sheet shows how far the
single pass is off.
"""

from __future__ import annotations


from .spec import EMISSIVITY, FACE_PAIR_EMISSIVITY, Template, Valid, gas_temperature

NAME = "partition-cavity"
CAVITY_METHODS = ["auto", "elsherbiny", "wright", "catton", "macgregor-emery", "conduction"]
STANDARD_GRAVITY = 9.80665  # m/s², standard gravity (as scipy.constants.g used by the engine)

ROOM_AIR = Valid(-30.0, 60.0, "room and store air lies between about -30 and +60 °C (common practice)")
GUESS = Valid(-30.0, 60.0, "a guessed surface lies between the two air temperatures, within -30 to +60 °C")


def branch_rows(*, height, area, board_t, board_k, gap, eps_room, eps_cav_warm, eps_cav_cold, method):
    """The partition's branch table (cell formulas in the template, numbers in the tests)."""
    return [
        ["conv_warm", "warm_face", "warm_air", "vplate", height, area, None, None, None, None],
        ["rad_warm", "warm_face", "warm_air", "radiation", eps_room, None, area, None, None, None],
        ["board_warm", "warm_face", "warm_cav", "conduction", board_t, board_k, area, None, None, None],
        ["cav_conv", "warm_cav", "cold_cav", "cavity", gap, height, area, 90, None, method],
        ["cav_rad", "warm_cav", "cold_cav", "radiation", eps_cav_warm, eps_cav_cold, area, None, None, None],
        ["board_cold", "cold_cav", "cold_face", "conduction", board_t, board_k, area, None, None, None],
        ["conv_cold", "cold_face", "cold_air", "vplate", height, area, None, None, None, None],
        ["rad_cold", "cold_face", "cold_air", "radiation", eps_room, None, area, None, None, None],
    ]


def boundary_rows(warm, cold):
    return [["warm_air", "T", warm], ["cold_air", "T", cold]]


def build(b) -> None:
    # ------------------------------------------------------------------ Inputs
    b.section("Inputs", "Air spaces")
    b.input("warm_t", "Warm-side air temperature", 21.0, "°C", "heated room", valid=ROOM_AIR)
    b.input("cold_t", "Cold-side air temperature", 4.0, "°C", "unheated store or stairwell", valid=ROOM_AIR)
    b.section("Inputs", "Partition")
    b.input("part_height", "Partition and cavity height", 2.7, "m",
            valid=Valid(0.1, 10.0, "at least 0.1 m; above 10 m the room-side faces leave the vertical-plate "
                        "correlations' range (Ra up to 1e12)"))
    b.input("part_width", "Partition width", 4.0, "m",
            valid=Valid(0.0, 1000.0, "a width above 0 (it scales the area only)", low_open=True))
    b.input("board_t", "Board thickness (each skin)", 0.0125, "m",
            valid=Valid(0.0, 0.2, "a board above 0 and at most 0.2 m thick", low_open=True))
    b.input("board_k", "Board conductivity", 0.25, "W/(m·K)", "gypsum board about 0.2-0.3",
            valid=Valid(0.0, 500.0, "above 0; no board conducts more than about 500 W/(m·K)", low_open=True))
    b.input("gap", "Cavity width (gap between the boards)", 0.05, "m",
            valid=Valid(0.0, 0.5, "a gap above 0; the cavity correlations cover height/gap from about 5 "
                        "(ElSherbiny: aspect 5-110), so at most 0.5 m", low_open=True))
    b.input("eps_room", "Emissivity of the room-side faces", 0.9, "-", "painted board about 0.9", valid=EMISSIVITY)
    b.input("eps_cav_warm", "Emissivity of the warm cavity face", 0.9, "-", "a foil facing is about 0.05",
            valid=FACE_PAIR_EMISSIVITY)
    b.input("eps_cav_cold", "Emissivity of the cold cavity face", 0.9, "-",
            valid=FACE_PAIR_EMISSIVITY)
    b.input("cav_method", "Cavity correlation", "auto", "", "auto picks the one whose range covers the case",
            choices=CAVITY_METHODS)
    b.section("Inputs", "Single-pass estimate: the guesses of a hand calculation")
    b.input("g_warm_face", "Guessed warm room-side face temperature", 19.0, "°C", valid=GUESS)
    b.input("g_warm_cav", "Guessed warm cavity face temperature", 17.0, "°C", valid=GUESS)
    b.input("g_cold_cav", "Guessed cold cavity face temperature", 8.0, "°C", valid=GUESS)
    b.input("g_cold_face", "Guessed cold room-side face temperature", 6.0, "°C", valid=GUESS)
    b.input("g_prop_t", "Guessed temperature for all air properties", 12.5, "°C", "e.g. the mean air temperature",
            valid=gas_temperature("air"))

    # ------------------------------------------------------------------ Calculation: network
    sheet = "Calculation"
    b.section(sheet, "Geometry")
    b.step("area", "Partition area", "=part_height*part_width", "m²")
    b.step("aspect", "Cavity aspect ratio (height / gap)", "=part_height/gap", "-")
    b.section("Tables", "Converged solution: network branches")
    branches = branch_rows(
        height="=part_height", area="=area", board_t="=board_t", board_k="=board_k", gap="=gap",
        eps_room="=eps_room", eps_cav_warm="=eps_cav_warm", eps_cav_cold="=eps_cav_cold", method="=cav_method")
    b.branch_table("Tables", branches, "pc_branches")
    b.section("Tables", "Converged solution: boundaries")
    b.boundary_table("Tables", boundary_rows("=warm_t", "=cold_t"), "pc_bounds")
    b.section("Tables", "Converged solution (one cell per entry; NET_SOLVE gives the same as one table)")
    net = "pc_branches, pc_bounds"
    picks = b.network_solution("Tables", net, "", branches)

    def h_of(branch):
        return picks[f"h:{branch}"]

    b.section(sheet, "Converged solution: results (network tables on the sheet Tables)")
    b.step("n_warm_face", "Warm room-side face", f'=NET_TEMP({net}, "warm_face")', "°C")
    b.step("n_warm_cav", "Warm cavity face", f'=NET_TEMP({net}, "warm_cav")', "°C")
    b.step("n_cold_cav", "Cold cavity face", f'=NET_TEMP({net}, "cold_cav")', "°C")
    b.step("n_cold_face", "Cold room-side face", f'=NET_TEMP({net}, "cold_face")', "°C")
    b.step("n_cold_face_low", "Cold room-side face, all convection at the lowest covering Nu",
           f'=INDEX(NET_BAND({net}, "cold_face"), 1, 1)', "°C", "correlation spread (NET_BAND)")
    b.step("n_cold_face_high", "Cold room-side face, all convection at the highest covering Nu",
           f'=INDEX(NET_BAND({net}, "cold_face"), 1, 2)', "°C")
    b.step("n_q", "Heat flow through the partition", f'=NET_HEAT({net}, "board_warm")', "W")
    b.step("n_u", "Thermal transmittance U (air to air)", "=n_q/(area*(warm_t-cold_t))", "W/(m²·K)")
    b.step("n_h_warm", "Warm-side convection coefficient", f"={h_of('conv_warm')}", "W/(m²·K)")
    b.step("n_hr_warm", "Warm-side radiation coefficient", f"={h_of('rad_warm')}", "W/(m²·K)")
    b.step("n_h_cav", "Cavity convection coefficient", f"={h_of('cav_conv')}", "W/(m²·K)")
    b.step("n_hr_cav", "Cavity radiation coefficient", f"={h_of('cav_rad')}", "W/(m²·K)")
    b.step("n_h_cold", "Cold-side convection coefficient", f"={h_of('conv_cold')}", "W/(m²·K)")
    b.step("n_hr_cold", "Cold-side radiation coefficient", f"={h_of('rad_cold')}", "W/(m²·K)")
    b.step("n_cav_method", "Cavity correlation used", "=" + picks["method:cav_conv"], "")
    b.step("n_check", "Network check", f"=NET_CHECK({net})", "")

    # ------------------------------------------------------------------ Calculation: single pass
    b.section(sheet, "Single pass: air properties at the one guessed temperature")
    b.step("sp_k", "Conductivity", "=AIR_CONDUCTIVITY(g_prop_t)", "W/(m·K)", number_format="0.0000")
    b.step("sp_nu", "Kinematic viscosity", "=AIR_KINVISC(g_prop_t)", "m²/s", number_format="0.000E+00")
    b.step("sp_alpha", "Thermal diffusivity", "=AIR_DIFFUSIVITY(g_prop_t)", "m²/s", number_format="0.000E+00")
    b.step("sp_beta", "Expansion coefficient", "=AIR_EXPANSION(g_prop_t)", "1/K")
    b.step("sp_pr", "Prandtl number", "=AIR_PRANDTL(g_prop_t)", "-", number_format="0.0000")
    b.step("sp_g", "Standard gravity", f"={STANDARD_GRAVITY}", "m/s²")
    b.step("sp_group", "g beta / (nu alpha)", "=sp_g*sp_beta/(sp_nu*sp_alpha)", "1/(K·m³)",
           number_format="0.000E+00")
    b.section(sheet, "Single pass: each coefficient once, at the guessed temperatures")
    b.step("sp_ra_warm", "Ra, warm room-side face (on the height)",
           "=sp_group*ABS(warm_t-g_warm_face)*part_height^3", "-", number_format="0.000E+00")
    b.step("sp_nu_warm", "Nu, warm face (vertical plate)", "=NU_VPLATE(sp_ra_warm, sp_pr)", "-")
    b.step("sp_h_warm", "h, warm face", "=sp_nu_warm*sp_k/part_height", "W/(m²·K)")
    b.step("sp_hr_warm", "h_rad, warm face to the room", "=H_RAD(g_warm_face, warm_t, eps_room)", "W/(m²·K)")
    b.step("sp_ra_cav", "Ra, cavity (on the gap)", "=sp_group*ABS(g_warm_cav-g_cold_cav)*gap^3", "-",
           number_format="0.000E+00")
    b.step("sp_nu_cav", "Nu, cavity", "=NU_CAVITY(sp_ra_cav, sp_pr, aspect, 90, cav_method)", "-")
    b.step("sp_cav_method", "Cavity correlation used", "=CAVITY_METHOD(sp_ra_cav, sp_pr, aspect, 90, cav_method)",
           "")
    b.step("sp_h_cav", "h, cavity", "=sp_nu_cav*sp_k/gap", "W/(m²·K)")
    b.step("sp_hr_cav", "h_rad across the cavity", "=H_RAD(g_warm_cav, g_cold_cav, eps_cav_warm, eps_cav_cold)",
           "W/(m²·K)")
    b.step("sp_ra_cold", "Ra, cold room-side face", "=sp_group*ABS(g_cold_face-cold_t)*part_height^3", "-",
           number_format="0.000E+00")
    b.step("sp_nu_cold", "Nu, cold face (vertical plate)", "=NU_VPLATE(sp_ra_cold, sp_pr)", "-")
    b.step("sp_h_cold", "h, cold face", "=sp_nu_cold*sp_k/part_height", "W/(m²·K)")
    b.step("sp_hr_cold", "h_rad, cold face to the room", "=H_RAD(g_cold_face, cold_t, eps_room)", "W/(m²·K)")
    b.section(sheet, "Single pass: resistances in series (per m²)")
    b.step("sp_r_warm", "Warm-side surface resistance", "=1/(sp_h_warm+sp_hr_warm)", "m²·K/W")
    b.step("sp_r_board", "One board", "=board_t/board_k", "m²·K/W")
    b.step("sp_r_cav", "Cavity resistance", "=1/(sp_h_cav+sp_hr_cav)", "m²·K/W")
    b.step("sp_r_cold", "Cold-side surface resistance", "=1/(sp_h_cold+sp_hr_cold)", "m²·K/W")
    b.step("sp_r_total", "Total, air to air", "=sp_r_warm+2*sp_r_board+sp_r_cav+sp_r_cold", "m²·K/W")
    b.step("sp_u", "Thermal transmittance U, single pass", "=1/sp_r_total", "W/(m²·K)")
    b.step("sp_q", "Heat flow, single pass", "=sp_u*area*(warm_t-cold_t)", "W")
    b.step("sp_warm_face", "Warm room-side face it implies", "=warm_t-sp_q/area*sp_r_warm", "°C")
    b.step("sp_warm_cav", "Warm cavity face it implies", "=sp_warm_face-sp_q/area*sp_r_board", "°C")
    b.step("sp_cold_cav", "Cold cavity face it implies", "=sp_warm_cav-sp_q/area*sp_r_cav", "°C")
    b.step("sp_cold_face", "Cold room-side face it implies", "=cold_t+sp_q/area*sp_r_cold", "°C")

    b.blank(sheet)
    b.section(sheet, "Side by side (chart data)")
    first, _, last, _ = b.table(sheet, ["position", "converged network °C", "single pass °C"], [
        ["warm air", "=warm_t", "=warm_t"],
        ["warm face", "=n_warm_face", "=sp_warm_face"],
        ["warm cavity face", "=n_warm_cav", "=sp_warm_cav"],
        ["cold cavity face", "=n_cold_cav", "=sp_cold_cav"],
        ["cold face", "=n_cold_face", "=sp_cold_face"],
        ["cold air", "=cold_t", "=cold_t"]], col=1, formats=[None, "0.0", "0.0"])

    # ------------------------------------------------------------------ Results
    b.section("Results", "Converged network")
    b.result("res_u", "U-value, air to air", "=n_u", "W/(m²·K)")
    b.result("res_q", "Heat flow through the partition", "=n_q", "W")
    b.result("res_warm_face", "Warm room-side face temperature", "=n_warm_face", "°C")
    b.result("res_cold_face", "Cold room-side face temperature", "=n_cold_face", "°C")
    b.result("res_cold_face_low", "Cold room-side face, correlation spread: lowest", "=n_cold_face_low", "°C",
             "spread of the published correlations (see Notes)")
    b.result("res_cold_face_high", "Cold room-side face, correlation spread: highest", "=n_cold_face_high", "°C")
    b.result("res_h_cav", "Cavity convection coefficient", "=n_h_cav", "W/(m²·K)")
    b.result("res_hr_cav", "Cavity radiation coefficient", "=n_hr_cav", "W/(m²·K)")
    b.section("Results", "Single pass (hand estimate, no iteration)")
    b.result("res_sp_u", "U-value, single pass", "=sp_u", "W/(m²·K)")
    b.result("res_sp_q", "Heat flow, single pass", "=sp_q", "W")
    b.result("res_sp_diff", "Single pass against the converged network", "=100*(sp_q-n_q)/n_q", "%",
             "positive: the single pass over-estimates the heat flow")
    b.result("res_sp_h_cav", "Cavity convection coefficient, single pass", "=sp_h_cav", "W/(m²·K)")
    b.result("res_sp_h_cav_diff", "Cavity convection coefficient, difference", "=100*(sp_h_cav-n_h_cav)/n_h_cav",
             "%")
    b.result("res_sp_cold_face", "Cold room-side face temperature, single pass", "=sp_cold_face", "°C")
    b.section("Results", "Validity")
    b.result("res_cav_method", "Cavity correlation (network)", "=n_cav_method", text=True)
    b.result("res_net_check", "Network check", "=n_check", text=True)
    b.result("res_sp_note", "Single-pass cavity correlation",
             '=NU_NOTE("cavity", sp_ra_cav, sp_pr, "", 90, aspect, cav_method)', text=True)
    b.caution("Results", "Caution: cold faces can collect condensation and grow mould. Check by a hygrothermal "
                         "assessment under local codes and licensed practice (see Notes).")
    categories = "=" + b.column(sheet, first, last, 1)
    b.chart("Results", "line", "Temperature through the partition",
            [{"name": "converged network", "categories": categories,
              "values": "=" + b.column(sheet, first, last, 2), "marker": {"type": "circle"}},
             {"name": "single pass", "categories": categories,
              "values": "=" + b.column(sheet, first, last, 3), "marker": {"type": "square"},
              "line": {"dash_type": "dash"}}],
            "", "temperature °C")

    # ------------------------------------------------------------------ Notes
    b.section("Notes", "Method")
    b.paragraph("Converged: the partition is a network warm air - warm face - board - cavity - board - cold "
                "face - cold air. Each room-side face exchanges heat with its room by natural convection "
                "(vertical plate) and radiation (to room surfaces at the room air temperature); the cavity "
                "carries convection (enclosed vertical air layer) and radiation between its two faces in "
                "parallel. NET_SOLVE iterates every coefficient at its own film temperature and temperature "
                "difference until the energy balances close.")
    b.paragraph("Single pass: the hand method a checker often sees - guess the four surface temperatures, take "
                "all air properties at one guessed temperature, compute each coefficient once (Ra from the "
                "properties, Nu from NU_VPLATE / NU_CAVITY, h = Nu k / L, h_rad from H_RAD), add the "
                "resistances in series and stop. The Results sheet gives its error against the converged "
                "network; the temperatures it implies differ from the guesses, which is the sign that a "
                "second pass was needed.")
    b.spread_note("cold room-side face temperature, converged network")
    b.section("Notes", "Correlations used (sources from the stillair registry)")
    b.cite("Room-side faces, Churchill-Chu", "vplate", "churchill-chu")
    b.cite("Cavity, ElSherbiny-Raithby-Hollands (auto's choice for tall vertical air layers)", "cavity", "elsherbiny")
    b.cite("Cavity, Wright (selectable)", "cavity", "wright")
    b.cite("Cavity, Catton (selectable)", "cavity", "catton")
    b.cite("Cavity, MacGregor-Emery (selectable; Pr range excludes air)", "cavity", "macgregor-emery")
    b.cite("Cavity, conduction limit", "cavity", "conduction")
    b.paragraph("Radiation: grey parallel surfaces across the cavity, F = 1/(1/eps1 + 1/eps2 - 1), and a grey "
                "surface in large surroundings on the room sides; Incropera et al., Fundamentals of Heat and "
                "Mass Transfer, 6th ed., eqs. 1.7 and 13.24.")
    b.section("Notes", "Assumptions")
    b.paragraph("One-dimensional heat flow through the middle of the partition: studs, edges and air leakage "
                "are ignored. The cavity is closed and unventilated. Room surfaces seen by the partition are at "
                "the room air temperature. Still air on both sides. Steady state.")
    b.section("Notes", "Cautions")
    b.paragraph("Condensation and mould: the cold-side faces and the cold cavity face can fall below the dew "
                "point of the air that reaches them, and long periods of high surface humidity grow mould. "
                "This template does not assess moisture. Defer to local codes and a hygrothermal assessment by "
                "licensed practice.", caution=True)


TEMPLATE = Template(NAME, 4, "Partition with a closed air cavity",
                    "Heat flow through a partition with a closed air cavity between two air spaces: "
                    "converged network against the single-pass hand estimate.", build)
