"""Care cautions for playing in a climate: cold, heat, sun, damp and dry air, by the instrument's
material.

These are the usual cautions of the trade (common practice, not computed physics). They never
replace the maker's instructions or local rules, and every list of them says so. A climate whose
conditions change in time is judged by its extremes: its coldest, hottest, sunniest, dampest and
driest moments (:func:`extremes`). The thresholds are the constants below, listed in
docs/guide.md ("Care cautions").
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

#: Thresholds of the cautions (common practice; docs/guide.md lists them). Air below COLD_C [°C]
#: is cold, below FREEZING_C freezing, above HOT_C hot; at or above MUGGY_C with relative
#: humidity at or above MUGGY_PCT [%] the heat and damp together tire players (the "caution"
#: band of the US National Weather Service heat index starts near a heat index of 27 °C, 80 °F;
#: from memory); sunshine at or above SUN_W_M2 [W/m^2] on the instrument (about a third of full
#: summer sun); relative humidity above DAMP_PCT or below DRY_PCT [%].
COLD_C, FREEZING_C, HOT_C = 10.0, 0.0, 30.0
MUGGY_C, MUGGY_PCT = 27.0, 60.0
SUN_W_M2 = 300.0
DAMP_PCT, DRY_PCT = 85.0, 30.0


@dataclass(frozen=True)
class Caution:
    """One care caution for one climate; ``when`` says which condition called for it (for a
    climate that changes, the extreme and its minute)."""

    climate: str
    topic: str
    text: str
    when: str = ""


@dataclass(frozen=True)
class Extreme:
    """One extreme condition of a climate: the value [°C, % or W/m^2] and the time [s]."""

    value: float
    time_s: float

    def label(self, unit: str, changing: bool) -> str:
        text = f"{self.value:.0f} {unit}"
        return f"{text} at {self.time_s / 60.0:.0f} min" if changing else text


def extremes(climate) -> dict[str, Extreme]:
    """The coldest, hottest, sunniest, dampest and driest moments of a climate (keys 'coldest',
    'hottest', 'sunniest', 'dampest', 'driest'), over the times its weather gives (conditions are
    linear between them, so the extremes lie at those times)."""
    weather = climate.schedule()
    points = list(zip(weather.times_s, weather.rooms))

    def pick(value, choose):
        t, room = choose(points, key=lambda p: value(p[1]))
        return Extreme(float(value(room)), float(t))

    def celsius(r):
        return r.temperature_c

    def rh(r):
        return r.relative_humidity * 100.0

    return {"coldest": pick(celsius, min), "hottest": pick(celsius, max),
            "sunniest": pick(lambda r: r.sun_w_m2, max), "dampest": pick(rh, max), "driest": pick(rh, min)}


def cautions(material: str | None, climate, solar_absorptance: float | None = None) -> list[Caution]:
    """The usual care cautions for an instrument of ``material`` in ``climate`` (common practice),
    judged by the climate's extremes (:func:`extremes`) against the thresholds of this module.

    ``solar_absorptance`` (of the material, [-]) tells a dark surface (0.6 or more), which the sun
    heats most, from a bright one.
    """
    ext = extremes(climate)
    changing = climate.weather is not None
    cold, hot, sun = ext["coldest"], ext["hottest"], ext["sunniest"]
    damp, dry = ext["dampest"], ext["driest"]
    wood = material in WOODS
    metal = material in METALS
    dark = solar_absorptance is not None and solar_absorptance >= 0.6
    out = []

    def add(topic, text, when):
        out.append(Caution(climate.name, topic, text, when))

    t_cold = cold.label("°C", changing)
    if cold.value < COLD_C and wood:
        add("cold", "Warm a wooden instrument slowly before playing (in its case, under a coat, in "
                    "the hands); warm breath blown into a cold wooden bore is a common cause of cracks. "
                    "Swab it dry after playing and keep it in its case between pieces.", t_cold)
    elif cold.value < COLD_C:
        add("cold", "Warm the instrument before tuning: a cold bore plays flat until it warms, and "
                    "the pitch moves as it does.", t_cold)
    if cold.value < FREEZING_C:
        add("freezing", "Condensed breath can freeze in tone holes, pads, keys and valves; swab "
                        "often and keep the instrument covered between tunes.", t_cold)
        if metal:
            add("freezing", "Bare lips and skin can stick to very cold metal; keep the mouthpiece "
                            "or head joint warm (under the coat) and do not put lips to frozen metal.", t_cold)
    if hot.value > HOT_C:
        add("heat", "Never leave the instrument in direct sun or in a closed car: pads, corks, "
                    "glue and lacquer soften, and wood dries and may split. Keep it in the shade "
                    "and in its case between sets.", hot.label("°C", changing))
    weather = climate.schedule()
    muggy = [(t, r) for t, r in zip(weather.times_s, weather.rooms)
             if r.temperature_c >= MUGGY_C and r.relative_humidity * 100.0 >= MUGGY_PCT]
    if muggy:
        t, r = muggy[0]
        when = f"{r.temperature_c:.0f} °C, {r.relative_humidity * 100:.0f} %"
        add("players", "Warm, humid air tires players: drink water, rest in the shade between "
                       "sets and follow the event's rules for heat.",
            f"{when} at {t / 60.0:.0f} min" if changing else when)
    if sun.value >= SUN_W_M2:
        t_sun = sun.label("W/m²", changing)
        add("sun", ("A dark surface takes in most of the sunshine: the instrument heats well above "
                    "the air, softening pads, cork grease and glue. " if dark else
                    "Sun heats metal hot to the touch and raises the pitch while it shines. ")
            + "Shade the instrument between pieces and never leave it lying in the sun.", t_sun)
        if wood:
            add("sun", "Sun on one side of a wooden body dries and warms it unevenly, a cause of "
                       "cracks: keep it in the shade or covered.", t_sun)
    if damp.value > DAMP_PCT:
        add("damp", "In damp air more breath condenses in the bore: swab often, let pads dry "
                    "after playing, and do not close a wet instrument in its case for long.",
            damp.label("%", changing))
    if dry.value < DRY_PCT and wood:
        add("dry", "Dry air draws moisture from wood and can crack it; keep the instrument in its "
                   "case with the humidity control the maker recommends.", dry.label("%", changing))
    return out
