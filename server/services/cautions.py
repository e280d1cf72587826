"""Safety cautions (../shared/DESIGN.md §7), chosen by what the work touches."""

from __future__ import annotations

GENERAL = (
    "These figures are estimates from steady-state methods. Verify requirements with the locally "
    "adopted code and have licensed professionals check wiring, combustion safety and structure."
)
CAUTIONS: dict[str, tuple[str, ...]] = {
    "attic": (
        "Old knob-and-tube wiring must not be buried in insulation: have an electrician inspect it first.",
        "Loose-fill that may be vermiculite can contain asbestos: have it tested before it is disturbed.",
        "Recessed lights not rated for insulation contact need clearance or listed covers.",
        "Keep the required clearance around chimneys and flues with a non-combustible dam.",
        "Keep soffit-to-ridge ventilation paths open (baffles at the eaves).",
    ),
    "walls": (
        "Knob-and-tube wiring in wall cavities must be inspected before dense-packing.",
        "Mind moisture: check the dew-point result on the surface page before closing a wall.",
    ),
    "foam": ("Foam plastics need an approved thermal or ignition barrier where exposed.",),
    "air_sealing": (
        "Air sealing changes how combustion appliances draft: test combustion safety (worst-case "
        "depressurisation, spillage, CO) after tightening the house.",
    ),
    "pipes": ("Keep pipe insulation clear of flue pipes and hot appliance vents.",),
    "floors": (
        "Cover ground in a crawlspace with a vapour retarder and keep insulation in contact with the subfloor.",
    ),
}
KIND_TOPICS = {
    "ceiling": ("attic",),
    "cathedral_roof": ("attic",),
    "kneewall": ("attic", "walls"),
    "wall": ("walls",),
    "rim_joist": ("walls", "foam"),
    "basement_wall": ("walls", "foam"),
    "floor": ("floors",),
    "pipe_run": ("pipes",),
}


def cautions_for(
    kinds: list[str] | tuple[str, ...], *, extra_topics: tuple[str, ...] = ()
) -> list[str]:
    """Cautions for the surface kinds (and extra topics such as 'air_sealing'), no repeats."""
    seen: list[str] = []
    topics = [t for kind in kinds for t in KIND_TOPICS.get(kind, ())] + list(extra_topics)
    for topic in topics:
        for text in CAUTIONS.get(topic, ()):
            if text not in seen:
                seen.append(text)
    return seen
