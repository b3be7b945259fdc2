"""Care cautions for playing in a climate: cold, heat, damp and dry air, by the instrument's material.

These are the usual cautions of the trade (common practice, not computed physics). They never
replace the maker's instructions or local rules, and every list of them says so.
"""

from __future__ import annotations

from dataclasses import dataclass

#: Closing line of every set of cautions.
DEFER = ("These are general care notes: follow the maker's instructions for your instrument and "
         "the local rules of the venue or event (for example on heat and cold for players).")

#: Materials that are wood (they crack when warmed too fast or dried out).
WOODS = ("tropical_hardwood",)
#: Materials that are metal (they conduct heat away from lips and hands).
METALS = ("yellow_brass", "nickel_silver", "sterling_silver")


@dataclass(frozen=True)
class Caution:
    """One care caution for one climate."""

    climate: str
    topic: str
    text: str


def cautions(material: str | None, climate) -> list[Caution]:
    """The usual care cautions for an instrument of ``material`` in ``climate`` (common practice).

    Thresholds (room air): below 10 °C (cold), below 0 °C (freezing), above 30 °C (heat and sun),
    relative humidity above 85 % (damp) or below 30 % (dry).
    """
    t = climate.temperature_c
    rh = climate.room.relative_humidity * 100
    wood = material in WOODS
    metal = material in METALS
    out = []

    def add(topic, text):
        out.append(Caution(climate.name, topic, text))

    if t < 10 and wood:
        add("cold", "Warm a wooden instrument slowly before playing (in its case, under a coat, in "
                    "the hands); warm breath blown into a cold wooden bore is a common cause of cracks. "
                    "Swab it dry after playing and keep it in its case between pieces.")
    elif t < 10:
        add("cold", "Warm the instrument before tuning: a cold bore plays flat until it warms, and "
                    "the pitch moves as it does.")
    if t < 0:
        add("freezing", "Condensed breath can freeze in tone holes, pads, keys and valves; swab "
                        "often and keep the instrument covered between tunes.")
        if metal:
            add("freezing", "Bare lips and skin can stick to very cold metal; keep the mouthpiece "
                            "or head joint warm (under the coat) and do not put lips to frozen metal.")
    if t > 30:
        add("heat", "Never leave the instrument in direct sun or in a closed car: pads, corks, "
                    "glue and lacquer soften, and wood dries and may split. Keep it in the shade "
                    "and in its case between sets.")
    if rh > 85:
        add("damp", "In damp air more breath condenses in the bore: swab often, let pads dry "
                    "after playing, and do not close a wet instrument in its case for long.")
    if rh < 30 and wood:
        add("dry", "Dry air draws moisture from wood and can crack it; keep the instrument in its "
                   "case with the humidity control the maker recommends.")
    return out
