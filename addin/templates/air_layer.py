"""air-layer: thermal resistance of an unventilated air layer in a wall, roof or floor.

The correlation-based value (cavity convection for the direction of heat flow + grey radiation
between the faces) stands beside the building standard's simplified value (ISO 6946, annex on
unventilated air layers: h_a by direction, h_r = E 4 sigma Tm^3), written as plain formulas, and
the difference.  A table and chart show both against the layer thickness.
"""

from __future__ import annotations

import stillair

from .book import TemplateBook, source_of
from .spec import FACE_PAIR_EMISSIVITY, SAND_EDGE, SIG3, SIGMA_TEXT, SLATE, Template, Valid, gas_pressure

DIRECTIONS = ("up", "horizontal", "down")
TILT = {"up": 0.0, "horizontal": 90.0, "down": 180.0}
SWEEP_MM = (5, 7, 10, 15, 20, 25, 30, 40, 50, 75, 100, 150, 200, 300)

# Our own scenario: a 35 mm wall air layer between masonry (0.9) and a foil-faced board (0.2).
DEFAULTS = dict(thickness=0.035, direction="horizontal", eps_warm=0.9, eps_cold=0.2, t_mean=6.0, delta_t=4.0,
                layer_extent=2.6, pressure=101325.0)


def iso_h_a_formula(d: str) -> str:
    """The standard's convective coefficient by direction, d the thickness reference (as recalled:
    unverified, listed on the Notes sheet)."""
    return (f'IF(direction="up",MAX(1.95,0.025/{d}),IF(direction="horizontal",MAX(1.25,0.025/{d}),'
            f"MAX(0.12*{d}^-0.44,0.025/{d})))")


def build(b: TemplateBook) -> None:
    d = DEFAULTS
    b.section("Inputs", "Air layer")
    b.input("thickness", "Layer thickness (face to face)", d["thickness"], "m", "the standard's formulas: up to 0.3 m",
            valid=Valid(0.0, 0.3, "a layer above 0 and at most 0.3 m thick (the standard's formulas end at "
                        "0.3 m)", low_open=True))
    b.input("direction", "Direction of heat flow", d["direction"], "",
            "up (roof, ceiling), horizontal (wall), down (floor)", choices=DIRECTIONS)
    b.input("eps_warm", "Emissivity of the warm face", d["eps_warm"], "-", "building materials about 0.9",
            valid=FACE_PAIR_EMISSIVITY)
    b.input("eps_cold", "Emissivity of the cold face", d["eps_cold"], "-", "aluminium foil 0.05, aged 0.2 or more",
            valid=FACE_PAIR_EMISSIVITY)
    b.input("t_mean", "Mean temperature of the layer", d["t_mean"], "°C",
            valid=Valid(-50.0, 80.0, "air layers in building elements lie between about -50 and +80 °C "
                        "(common practice)"))
    b.input("delta_t", "Temperature difference across the layer", d["delta_t"], "K",
            "the standard's h_a formulas assume at most 5 K",
            valid=Valid(0.0, 50.0, "a difference above 0 (the faces must differ) and at most 50 K", low_open=True))
    b.input("layer_extent", "Layer extent along the faces (height of a wall layer)", d["layer_extent"], "m",
            "aspect ratio of the correlations",
            valid=Valid(0.05, 20.0, "from 0.05 to 20 m: the extent sets the aspect ratio of the cavity "
                        "correlations"))
    b.input("pressure", "Air pressure", d["pressure"], "Pa", "101325 at sea level", valid=gas_pressure())

    b.section("Calculation", "Faces and direction")
    b.step("tilt", "Cavity tilt from the horizontal (0 up, 90 horizontal, 180 down)",
           '=IF(direction="up",0,IF(direction="horizontal",90,180))', "°", "heat flow up = heated from below")
    b.step("t_warm", "Warm face temperature", "=t_mean+delta_t/2", "°C")
    b.step("t_cold", "Cold face temperature", "=t_mean-delta_t/2", "°C")
    b.section("Calculation", "Correlation-based resistance")
    b.step("ra", "Rayleigh number on the thickness", "=RAYLEIGH(t_warm,t_cold,thickness,\"air\",pressure)", "-",
           number_format="0.00E+00")
    b.step("pr", "Prandtl number at the mean temperature", "=AIR_PRANDTL(t_mean,pressure)", "-")
    b.step("aspect", "Aspect ratio extent/thickness", "=layer_extent/thickness", "-")
    b.step("corr_method", "Cavity correlation (auto)", "=CAVITY_METHOD(ra,pr,aspect,tilt,\"auto\")", "",
           number_format="@")
    b.step("nu", "Nusselt number", "=NU_CAVITY(ra,pr,aspect,tilt,\"auto\")", "-")
    b.step("h_conv", "Convection coefficient across the layer",
           "=H_CAVITY(t_warm,t_cold,thickness,layer_extent,tilt,\"air\",pressure,\"auto\")", "W/(m²·K)",
           "t1 = warm face; tilt 180 with the warm face on top = conduction")
    b.step("h_radiation", "Radiation coefficient between the faces", "=H_RAD(t_warm,t_cold,eps_warm,eps_cold)",
           "W/(m²·K)", "grey parallel faces, exact T⁴ linearised")
    b.step("r_correlation", "Resistance 1/(h_conv + h_rad)", "=1/(h_conv+h_radiation)", "m²·K/W")
    spread = 'NU_SPREAD("cavity",ra,pr,"",tilt,aspect)'
    b.step("spread_count", "Correlations covering the case (NU_SPREAD)", f"=INDEX({spread},1,3)", number_format="0")
    b.step("nu_low", "Lowest covering Nu", f"=INDEX({spread},1,1)", "-")
    b.step("nu_high", "Highest covering Nu", f"=INDEX({spread},1,2)", "-")
    b.step("r_spread_high", "Resistance with the lowest Nu 1/(h_conv Nu_low/Nu + h_rad)",
           "=IF(spread_count>0,1/(h_conv*nu_low/nu+h_radiation),\"no correlation covers the case\")", "m²·K/W")
    b.step("r_spread_low", "Resistance with the highest Nu 1/(h_conv Nu_high/Nu + h_rad)",
           "=IF(spread_count>0,1/(h_conv*nu_high/nu+h_radiation),\"no correlation covers the case\")", "m²·K/W")
    b.section("Calculation", "Simplified value of the building standard (ISO 6946 annex; unverified, see Notes)")
    b.unverified("ISO 6946 annex on unventilated air layers: h_a = max(1.25, 0.025/d) W/(m²·K) horizontal "
                 "heat flow, max(1.95, 0.025/d) upward, max(0.12 d^-0.44, 0.025/d) downward (d in m, dT <= 5 K)")
    b.step("sigma", "Stefan-Boltzmann constant", f"={SIGMA_TEXT}", "W/(m²·K⁴)", "CODATA 2018",
           number_format="0.0000E+00")
    b.step("iso_h_a", "h_a: up max(1.95, 0.025/d); horizontal max(1.25, 0.025/d); down max(0.12 d^-0.44, 0.025/d)",
           "=" + iso_h_a_formula("thickness"), "W/(m²·K)", "d in m")
    b.step("iso_e", "Intersurface emittance E = 1/(1/e1 + 1/e2 - 1)", "=1/(1/eps_warm+1/eps_cold-1)", "-")
    b.step("iso_h_r0", "Black-body coefficient h_r0 = 4 sigma Tm³", "=4*sigma*(t_mean+273.15)^3", "W/(m²·K)")
    b.step("iso_h_r", "h_r = E h_r0", "=iso_e*iso_h_r0", "W/(m²·K)")
    b.step("r_simplified", "Resistance 1/(h_a + h_r)", "=1/(iso_h_a+iso_h_r)", "m²·K/W")

    b.section("Results", "Thermal resistance of the air layer")
    b.result("r_layer", "R from correlations + radiation", "=r_correlation", "m²·K/W",
             "cavity correlation as named below, exact grey radiation")
    b.result("r_layer_low", "R, correlation spread: lowest", "=r_spread_low", "m²·K/W",
             "spread of the published correlations (see Notes)")
    b.result("r_layer_high", "R, correlation spread: highest", "=r_spread_high", "m²·K/W")
    b.result("r_standard", "R, the standard's simplified formulas", "=r_simplified", "m²·K/W",
             b.unverified("ISO 6946 annex formulas for h_a (see the Calculation sheet)"))
    b.result("r_standard_rounded", "R, simplified, rounded as the standard's table", "=ROUND(r_simplified,2)",
             "m²·K/W", number_format="0.00")
    b.result("r_difference", "Difference, correlation - simplified", "=r_layer-r_standard", "m²·K/W",
             number_format="0.000")
    b.result("r_difference_pct", "Difference relative to the simplified value", "=100*r_difference/r_standard", "%")
    b.result("u_layer", "Conductance of the layer 1/R (correlations)", "=1/r_layer", "W/(m²·K)")
    b.section("Results", "Checks and validity notes")
    b.result("method_used", "Cavity correlation used", "=corr_method", text=True)
    b.result("validity_note", "Correlation validity", '=NU_NOTE("cavity",ra,pr,"",tilt,aspect,"auto")', text=True)
    b.result("standard_note", "The standard's simplified formulas",
             '=IF(delta_t>5,"outside: dT above 5 K",IF(thickness>0.3,"outside: thickness above 0.3 m",'
             '"inside their stated conditions (dT <= 5 K, d <= 0.3 m)"))', text=True)
    b.result("share_radiation", "Share of the heat flow by radiation", "=100*h_radiation/(h_conv+h_radiation)", "%")

    b.section("Results", "R against thickness for this direction, emissivities and temperatures")
    start = b.sheets["Results"].row + 1
    rows = []
    for i, mm in enumerate(SWEEP_MM):
        ref = f"(A{start + i + 1}/1000)"
        rows.append([float(mm),
                     f"=1/(H_CAVITY(t_warm,t_cold,{ref},layer_extent,tilt,\"air\",pressure,\"auto\")+h_radiation)",
                     f"=1/({iso_h_a_formula(ref)}+iso_h_r)"])
    first, _, last, _ = b.table("Results", ["thickness mm", "R correlations m²·K/W", "R simplified m²·K/W"],
                                rows, name="thickness_sweep", formats=["0", SIG3, SIG3])
    assert first == start
    thicknesses = "=" + TemplateBook.column("Results", first, last, 0)
    series = [{"name": "correlations + radiation", "categories": thicknesses,
               "values": "=" + TemplateBook.column("Results", first, last, 1), "line": {"color": SLATE, "width": 1.75},
               "marker": {"type": "circle", "size": 4, "fill": {"color": SLATE}}},
              {"name": "standard, simplified", "categories": thicknesses,
               "values": "=" + TemplateBook.column("Results", first, last, 2),
               "line": {"color": SAND_EDGE, "width": 1.75, "dash_type": "dash"},
               "marker": {"type": "square", "size": 4, "fill": {"color": SAND_EDGE}}}]
    b.chart("Results", "scatter", "Air-layer resistance against thickness", series, "thickness, mm (log scale)",
            "R, m²·K/W", subtype="straight_with_markers",
            x_axis={"log_base": 10, "min": 1, "max": 1000})

    cav = stillair.CORRELATIONS
    b.paragraph("Method. The faces are at t_mean +- dT/2. Correlation-based value: convection across the layer "
                "from the cavity correlation that covers the case (CAVITY_METHOD names it), tilt 0 for heat flow "
                "up (heated from below), 90 for horizontal heat flow (vertical layer), 180 for heat flow down "
                "(heated from above: pure conduction, Nu = 1), plus grey radiation between the two faces with the "
                "exact T⁴ law; R = 1/(h_conv + h_rad), air properties at the mean temperature.")
    b.paragraph("Simplified value: the annex of ISO 6946 (Building components and building elements - Thermal "
                "resistance and thermal transmittance - Calculation methods) on unventilated air layers, as "
                "recalled (unverified: not checked against the text): h_a = max(1.25, 0.025/d) for horizontal "
                "heat flow, max(1.95, 0.025/d) upward, max(0.12 d^-0.44, 0.025/d) downward (d in m, dT <= 5 K); "
                "h_r = E h_r0 with E = 1/(1/e1 + 1/e2 - 1) and h_r0 = 4 sigma Tm³; R = 1/(h_a + h_r). The "
                "standard's table of R for high-emissivity faces (e = 0.9, 10 °C mean) follows from these.")
    b.spread_note("resistance of the air layer")
    b.paragraph("Correlations the automatic choice uses for the three directions:")
    used = []
    for direction, tilt in TILT.items():
        method = str(stillair.cavity_method(1.0e4, 0.71, 50.0, tilt))
        used.append((direction, method))
    for direction, method in used:
        c = cav[("cavity", method)]
        b.paragraph(f"- heat flow {direction}: cavity {method}: {c.title}. Source: {source_of('cavity', method)}")
    b.paragraph("The auto choice depends on Ra and the aspect ratio; the Results sheet names the one used and "
                "whether the case lies inside its validity range.")
    b.paragraph("Assumptions: unventilated, airtight layer; faces isothermal, parallel and large compared with "
                "the thickness; grey opaque faces; no moisture transport. Slightly or well ventilated layers are "
                "treated differently by the standard and are not covered here.")
    b.paragraph("Caution: an air layer's resistance is only part of a building element's performance. Check "
                "condensation risk (and mould) of the whole construction with a hygrothermal method, and defer "
                "to local codes, manufacturers' declared data and licensed practice.", caution=True)


TEMPLATE = Template(
    name="air-layer", version=4, title="Unventilated air layer",
    summary="Thermal resistance of an unventilated air layer from correlations + radiation, beside the "
            "building standard's simplified value.",
    build=build)
