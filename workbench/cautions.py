"""The safety cautions shown in the README, the app, the CLI and the calculation record.

Plain text with no UI imports, so every front end shows the same words.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Caution:
    topic: str
    text: str


PREAMBLE = (
    "Results are screening estimates for trained people. They do not replace a design check, "
    "and they defer to local codes, company standards and licensed engineering practice."
)

CAUTIONS: tuple[Caution, ...] = (
    Caution(
        "Surge",
        "Fast valve closures, pump trips and slamming check valves raise pressure by the "
        "Joukowsky amount (rho*a*dv) and more. A rigid-column estimate is not valid for fast "
        "closures: where the tool flags rapid closure, get an elastic (wave) analysis before "
        "relying on the pipe's rating.",
    ),
    Caution(
        "Sub-atmospheric pressure and vacuum collapse",
        "Lines over high points, siphons and drains can run below atmospheric pressure. Thin-walled "
        "and plastic pipe, flexible hoses and tanks drained with a blocked or undersized vent can "
        "collapse. Air drawn in at joints changes the flow.",
    ),
    Caution(
        "Vacuum on tanks and tank vents",
        "Atmospheric storage tanks are built for a few hundred pascals (a few hundredths of "
        "a psi) of vacuum; a drain or "
        "pump-out through a vent that is too small, iced, fouled with polymer or blanked "
        "after maintenance pulls them in. The vent model is an ideal-gas air space: a "
        "nitrogen or other inert blanket changes the gas, and its blanketing regulator (not "
        "the vent) then sets the pressure; flame arresters, conservation (pressure-vacuum) "
        "vents and emergency vents pass what their makers' stated capacity curves say, not "
        "an orifice law. Size and check vents to the tank's design code and API 2000 / "
        "ISO 28300 (thermal breathing, fire case), and follow local practice.",
    ),
    Caution(
        "Siphon break and column separation",
        "Where the pressure nears the liquid's vapour pressure, dissolved air and vapour come "
        "out and the column separates. The workbench then passes only what the leg up to the "
        "crest can lift, but air release starts above vapour pressure, so a real siphon breaks "
        "sooner: keep crests well below the limit; hot liquids flash at high points. When a "
        "separated column rejoins after a fast valve move, the cavity's collapse can raise the "
        "pressure beyond the closure's own surge: get a specialist surge study.",
    ),
    Caution(
        "Back-siphonage",
        "A line that can run full from a lower tank or process back towards a potable or clean "
        "source needs an air gap or backflow protection as local codes require.",
    ),
    Caution(
        "Overflow",
        "Check overflow capacity for the worst-case inflow with the outlet shut, including air "
        "entrainment and blocked screens; alarms and trips are not shown by this tool.",
    ),
    Caution(
        "Vortexing and air entrainment",
        "Low submergence over an outlet draws air, cuts the flow and can make a drain surge; "
        "the submergence check is a screening rule only.",
    ),
    Caution(
        "Static electricity",
        "Free-fall filling and high velocities of low-conductivity flammable liquids build "
        "static charge: follow the relevant standards for bottom filling and velocity limits.",
    ),
    Caution(
        "Confined spaces",
        "Tanks, wet wells, chambers and pits are confined spaces with toxic or oxygen-deficient "
        "atmospheres. A computed 'drained' time is never proof that a tank is empty or safe to "
        "enter: isolate, verify, ventilate, test the atmosphere and hold a permit.",
    ),
    Caution(
        "Model limits",
        "Rigid-column transients, Newtonian single-phase liquid, uncertain friction in the "
        "transitional regime, roughness that grows with age, and full-bore flow assumed "
        "throughout. Verify critical results by an independent method.",
    ),
)


def cautions_text(width_hint: int = 0) -> str:
    """All cautions as plain text paragraphs (Markdown-friendly)."""
    lines = [PREAMBLE, ""]
    for c in CAUTIONS:
        lines.append(f"- {c.topic}: {c.text}")
    return "\n".join(lines)
