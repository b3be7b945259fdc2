"""Wind instruments as the maker draws them: bore, side holes, fingerings, input end, tuning joint
and design condition, and the instrument files that describe them.

An instrument file (TOML, documented key by key in docs/formats.md) gives the bore as stations
(position from the input end, inner diameter) joined by straight-sided (conical) pieces, the side
holes, the fingerings, the input end (reed, lip mouthpiece or jet embouchure), a tuning joint
and the condition the maker tuned it at. Everything here is SI: lengths in m, volumes in m^3,
temperatures in K. File keys carry their units (``_mm``, ``_mm3``, ``_c``, ``_pct``, ``_kpa``).
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass, field
from importlib import resources
from pathlib import Path

import numpy as np

from drift.climate import Room
from drift.constants import A4_HZ, DEFAULT_CO2_FRACTION, STANDARD_PRESSURE, ZERO_CELSIUS
from drift.errors import DriftError, InputFileError, OutOfRangeError
from drift.files import Table, bundled_files, bundled_text, load_named, short_repr
from drift.materials import DEFAULT_MATERIALS, Material, material
from drift.scale import note_to_midi
from drift.valves import Slide, Valve, parse_note_path, parse_slide, parse_stations, parse_valves

EXCITATIONS = ("reed", "lips", "jet")

TOP_KEYS = ("name", "description", "excitation", "material", "reference_temperature_c", "wall_mm",
            "transposition_semitones", "bore", "input", "hole", "valve", "slide", "note", "design", "tuning")
BORE_KEYS = ("stations_mm",)
HOLE_KEYS = ("name", "position_mm", "diameter_mm", "chimney_mm")
NOTE_KEYS = ("name", "closed", "register", "valves", "slide_position", "slide_mm")
DESIGN_KEYS = ("temperature_c", "relative_humidity_pct", "pressure_kpa", "co2_ppm", "playing", "a4_hz")
TUNING_KEYS = ("position_mm", "min_change_mm", "max_change_mm")
INPUT_KEYS = {
    "reed": ("reed_volume_mm3", "cavity_volume_mm3"),
    "lips": ("cup_volume_mm3", "throat_diameter_mm", "throat_length_mm", "backbore_length_mm"),
    "jet": ("embouchure_position_mm", "embouchure_diameter_mm", "embouchure_chimney_mm",
            "embouchure_outer_correction_mm", "lip_cover_pct"),
}

#: Equivalent volume of a reed's compliance and pumped flow [m^3] at the reed's reference
#: condition (:data:`REED_REFERENCE_GAMMA` x :data:`REED_REFERENCE_PRESSURE`): about 1 cm^3 for a
#: clarinet reed (Nederveen 1998, *Acoustical Aspects of Woodwind Instruments*, Sec. 9; Dalmont
#: et al. 1995; value from memory).
DEFAULT_REED_VOLUME = 1.0e-6
#: The condition a reed's equivalent volume is given at: gamma p = 1.4 x 101325 Pa (the standard
#: atmosphere's pressure, ISO 2533, and the heat-capacity ratio 7/5 of an ideal diatomic gas, by
#: definition of the key). A reed of mechanical compliance C [m^3/Pa] acts as the volume
#: V = gamma p C of the air at the input (Nederveen 1998, Sec. 9, from memory), so
#: C = V_ref / (1.4 x 101325 Pa).
REED_REFERENCE_GAMMA = 1.4
REED_REFERENCE_PRESSURE = 101325.0
#: Lip-mouthpiece defaults (common practice for a trumpet-sized mouthpiece, from memory):
#: cup volume [m^3], throat diameter and length [m], backbore length [m].
DEFAULT_CUP_VOLUME = 1.5e-6
DEFAULT_THROAT_DIAMETER = 3.7e-3
DEFAULT_THROAT_LENGTH = 5.0e-3
DEFAULT_BACKBORE_LENGTH = 60.0e-3
#: Jet embouchure defaults (common practice for a transverse flute, from memory): hole diameter
#: and chimney height (wall plus lip plate) [m].
DEFAULT_EMBOUCHURE_DIAMETER = 10.0e-3
DEFAULT_EMBOUCHURE_CHIMNEY = 5.0e-3
#: Share of the embouchure hole's area the lower lip covers [-]: about a quarter (common
#: practice, from memory; players cover more to flatten and less to sharpen).
DEFAULT_LIP_COVER = 0.25
#: Largest lip cover accepted [-] (beyond it the hole is mostly shut and the jet model fails).
MAX_LIP_COVER = 0.7
#: Least distance between the edges of two holes along the bore [m]: the hole model treats each
#: hole alone, which holes that touch or overlap break (common practice for drilled holes).
MIN_HOLE_GAP = 1.0e-3
#: Wall thickness when neither the file nor its material gives one [m] (common practice for
#: wooden and plastic woodwind bodies).
DEFAULT_WALL = 3.0e-3
#: Reference temperature of the dimensions when the file gives none [K] (20 °C, ISO 1).
DEFAULT_REFERENCE_TEMPERATURE = ZERO_CELSIUS + 20.0
#: Tuning-joint travel when a [tuning] table gives none [m] (common practice: a barrel or head
#: joint pushed in up to 2 mm or pulled out up to 6 mm).
DEFAULT_MIN_CHANGE = -2.0e-3
DEFAULT_MAX_CHANGE = 6.0e-3
#: Largest transposition accepted [semitones]: three octaves either way.
MAX_TRANSPOSITION = 36
#: The bundled instrument commands use when none is named.
DEFAULT_INSTRUMENT = "cylindrical-reed"


# --------------------------------------------------------------------------------------------
# Dataclasses
# --------------------------------------------------------------------------------------------


@dataclass(frozen=True)
class Hole:
    """A side hole: tone hole, register or octave hole.

    Attributes: name, position_m [m] (centre, from the input end), diameter_m [m],
    chimney_m [m] (height of the hole through the wall).
    """

    name: str
    position_m: float
    diameter_m: float
    chimney_m: float


@dataclass(frozen=True)
class Note:
    """A fingering: the holes closed (all others open), the register it plays in, its name.

    ``name`` is the sounding pitch in scientific pitch notation (None for an unnamed fingering);
    ``register`` 1 is the lowest resonance of the fingering (peak of |Z| for reed and lips, dip
    for jet), 2 the next, ...; ``valves`` names the valves pressed and ``slide_m`` [m] is how far
    the slide is out (its travel; the air path grows by :data:`drift.valves.SLIDE_LEGS` times it).
    """

    name: str | None
    closed: tuple[str, ...]
    register: int = 1
    valves: tuple[str, ...] = ()
    slide_m: float = 0.0

    @property
    def path(self) -> tuple:
        """What sets the bore this note plays on: the valves pressed and the slide's travel."""
        return (tuple(sorted(self.valves)), self.slide_m)


@dataclass(frozen=True)
class Design:
    """The condition the maker tuned the instrument at.

    Attributes
    ----------
    temperature_k : float
        Room temperature [K] (default 293.15 K, 20 °C).
    relative_humidity : float
        [0-1] (default 0.5).
    pressure_pa : float
        [Pa] (default 101325).
    co2_fraction : float
        [mol/mol] (default 420e-6).
    playing : bool
        True: in tune while played (bore air warmed and filled with breath: the steady played
        state of :mod:`drift.thermal`); False (default): in tune with the bore full of room air
        at room temperature.
    a4_hz : float
        Reference pitch [Hz] (default 440, ISO 16).
    """

    temperature_k: float = ZERO_CELSIUS + 20.0
    relative_humidity: float = 0.5
    pressure_pa: float = STANDARD_PRESSURE
    co2_fraction: float = DEFAULT_CO2_FRACTION
    playing: bool = False
    a4_hz: float = A4_HZ

    def room(self):
        """The design room air as :class:`drift.climate.Room`."""
        return Room(self.temperature_k, self.pressure_pa, self.relative_humidity, self.co2_fraction)


@dataclass(frozen=True)
class Tuning:
    """The tuning joint: where length is added or removed, and how far it may move.

    Attributes: position_m [m] from the input end, min_change_m [m] (negative: pushed in),
    max_change_m [m] (positive: pulled out).
    """

    position_m: float
    min_change_m: float = DEFAULT_MIN_CHANGE
    max_change_m: float = DEFAULT_MAX_CHANGE


@dataclass(frozen=True)
class InputEnd:
    """What the exciter adds at the input end of the bore.

    reed : ``reed_compliance_m3_pa`` [m^3/Pa], the reed's compliance C (with its pumped flow),
        acting as the volume gamma p C of the air at the input; ``added_volume_m3`` [m^3], a
        fixed geometric volume at the input: a mouthpiece cavity or the missing tip of a cone not
        drawn as bore. Both are compliances in parallel at the input.
    lips : ``added_volume_m3`` is the cup volume [m^3]; a throat (cylinder of
        ``throat_diameter_m`` x ``throat_length_m``) and a backbore (cone from the throat to the
        bore's first diameter, ``backbore_length_m``) lie before position 0.
    jet : the embouchure hole, centre at ``embouchure_position_m`` [m] from the closed end
        (position 0; the bore before it is the cavity), of ``embouchure_diameter_m`` and
        ``embouchure_chimney_m`` [m]; ``lip_cover`` [-] is the share of its area the lower lip
        covers, which sets its outer end correction
        (:func:`drift.acoustics.embouchure_outer_correction`) unless
        ``embouchure_outer_correction_m`` [m] gives that correction directly.
    """

    kind: str
    added_volume_m3: float = 0.0
    reed_compliance_m3_pa: float = 0.0
    throat_diameter_m: float = 0.0
    throat_length_m: float = 0.0
    backbore_length_m: float = 0.0
    embouchure_position_m: float = 0.0
    embouchure_diameter_m: float = 0.0
    embouchure_chimney_m: float = 0.0
    embouchure_outer_correction_m: float | None = None
    lip_cover: float = 0.0


@dataclass(frozen=True)
class Instrument:
    """A wind instrument: bore, holes, fingerings, input end, tuning joint and design condition.

    ``stations_m`` is an (n, 2) array of [position from the input end, inner diameter] [m],
    positions strictly ascending; the bore is conical between stations. Notes are named by their
    sounding pitch; ``transposition_semitones`` is written minus sounding pitch (2 for an
    instrument in B♭, 0 at concert pitch; :func:`drift.scale.written_name`).
    """

    name: str
    excitation: str
    stations_m: np.ndarray
    holes: tuple[Hole, ...] = ()
    notes: tuple[Note, ...] = ()
    input_end: InputEnd = field(default_factory=lambda: InputEnd(
        "reed", reed_compliance_m3_pa=DEFAULT_REED_VOLUME / (REED_REFERENCE_GAMMA * REED_REFERENCE_PRESSURE)))
    design: Design = field(default_factory=Design)
    tuning: Tuning | None = None
    material: str | None = None
    reference_temperature_k: float = DEFAULT_REFERENCE_TEMPERATURE
    wall_m: float | None = None
    description: str = ""
    source: str = ""
    transposition_semitones: int = 0
    valves: tuple[Valve, ...] = ()
    slide: Slide | None = None

    @property
    def length_m(self) -> float:
        """Bore length [m] from the input end to the open end."""
        return float(self.stations_m[-1, 0])

    @property
    def hole_names(self) -> tuple[str, ...]:
        return tuple(h.name for h in self.holes)

    @property
    def wall_thickness_m(self) -> float:
        """Wall thickness [m]: the file's ``wall_mm``, else the material's typical wall, else 3 mm."""
        if self.wall_m is not None:
            return self.wall_m
        if self.material is not None:
            return material(self.material).wall_thickness
        return DEFAULT_WALL

    @property
    def wall_material(self) -> Material:
        """The wall material: the file's ``material``, else the default of its excitation
        (:data:`drift.materials.DEFAULT_MATERIALS`)."""
        return material(self.material or DEFAULT_MATERIALS[self.excitation])

    def fingerings(self) -> tuple[Note, ...]:
        """The notes of the file; with none, one unnamed fingering with every hole open."""
        return self.notes or (Note(None, (), 1),)

    def open_mask(self, notes=None) -> np.ndarray:
        """Boolean (n_notes, n_holes) array, True where a hole is open in that fingering."""
        notes = self.fingerings() if notes is None else notes
        names = self.hole_names
        mask = np.ones((len(notes), len(names)), dtype=bool)
        for i, note in enumerate(notes):
            for hole in note.closed:
                mask[i, names.index(hole)] = False
        return mask

    def diameter_at(self, positions_m) -> np.ndarray:
        """Bore diameter [m] at positions [m], linear between stations."""
        return np.interp(positions_m, self.stations_m[:, 0], self.stations_m[:, 1])

    def with_holes(self, holes) -> "Instrument":
        """A copy with other holes (same names are expected by the notes)."""
        return dataclasses.replace(self, holes=tuple(holes))

    def with_joint_change(self, delta_m: float) -> "Instrument":
        """The instrument with ``delta_m`` [m] of bore added (> 0) or removed (< 0) at the joint.

        Length is inserted or cut at ``tuning.position_m``; stations and holes below it move by
        ``delta_m``. An inserted piece is a cylinder of the bore diameter at the joint; a removed
        piece takes out the bore from the joint to ``joint + |delta_m|`` (its diameter at the joint
        is kept). Raises :class:`DriftError` without a tuning joint, and
        :class:`OutOfRangeError` outside ``[min_change_m, max_change_m]``.
        """
        if self.tuning is None:
            raise DriftError(f"{self.name}: the instrument has no [tuning] joint")
        t = self.tuning
        if not t.min_change_m - 1e-12 <= delta_m <= t.max_change_m + 1e-12:
            raise OutOfRangeError(
                f"{self.name}: joint change {delta_m * 1e3:g} mm is outside the allowed range "
                f"{t.min_change_m * 1e3:g} to {t.max_change_m * 1e3:g} mm"
            )
        return self.with_length_change(t.position_m, delta_m)

    def with_length_change(self, position_m: float, delta_m: float) -> "Instrument":
        """The instrument with ``delta_m`` [m] of bore added (> 0) or removed (< 0) at ``position_m``.

        The operation behind :meth:`with_joint_change`, without its travel limits (used by the
        hole-layout solver to set the bore length). Raises :class:`OutOfRangeError` when a removal
        would cut a hole or the whole bore beyond the position.
        """
        if delta_m == 0.0:
            return self
        p = position_m
        x, d = self.stations_m[:, 0], self.stations_m[:, 1]
        if delta_m < 0 and p - delta_m >= x[-1]:
            raise OutOfRangeError(f"{self.name}: cannot remove {-delta_m * 1e3:g} mm beyond {p * 1e3:g} mm")
        d_joint = float(np.interp(p, x, d))
        before = [(xi, di) for xi, di in zip(x, d) if xi < p - 1e-12]
        if delta_m > 0:
            after = [(xi + delta_m, di) for xi, di in zip(x, d) if xi > p + 1e-12]
            new = before + [(p, d_joint), (p + delta_m, d_joint)] + after
        else:
            cut = -delta_m
            after = [(xi - cut, di) for xi, di in zip(x, d) if xi > p + cut + 1e-12]
            new = before + [(p, d_joint)] + after
        holes = []
        for h in self.holes:
            if h.position_m > p:
                if delta_m < 0 and h.position_m < p - delta_m + h.diameter_m / 2:
                    raise OutOfRangeError(
                        f"{self.name}: removing {-delta_m * 1e3:g} mm at {p * 1e3:g} mm would cut hole {h.name}"
                    )
                h = dataclasses.replace(h, position_m=h.position_m + delta_m)
            holes.append(h)
        tuning, slide = self.tuning, self.slide
        if tuning is not None and tuning.position_m > p:
            tuning = dataclasses.replace(tuning, position_m=tuning.position_m + delta_m)
        if slide is not None and slide.position_m > p:
            slide = dataclasses.replace(slide, position_m=slide.position_m + delta_m)
        valves = tuple(dataclasses.replace(v, position_m=v.position_m + delta_m) if v.position_m > p else v
                       for v in self.valves)
        stations = _dedupe(np.array(new, dtype=float))
        return dataclasses.replace(self, stations_m=stations, holes=tuple(holes), tuning=tuning, valves=valves,
                                   slide=slide)



def _dedupe(stations: np.ndarray) -> np.ndarray:
    keep = np.concatenate([[True], np.diff(stations[:, 0]) > 1e-12])
    return stations[keep]


# --------------------------------------------------------------------------------------------
# Instrument files
# --------------------------------------------------------------------------------------------


def parse_instrument(data: dict, path: str | Path = "<instrument>") -> Instrument:
    """An :class:`Instrument` from the parsed TOML of an instrument file, strictly checked.

    Every problem raises :class:`InputFileError` naming the file, the key and what is allowed;
    see docs/formats.md for the keys and their defaults.
    """
    top = Table(data, path, "", TOP_KEYS)
    name = top.string("name", required=True)
    excitation = top.string("excitation", required=True, choices=EXCITATIONS)
    description = top.string("description", default="") if top.has("description") else ""
    material_name = None
    if top.has("material"):
        material_name = top.string("material")
        try:
            material(material_name)
        except InputFileError as error:
            top.fail("material", f"= '{material_name}': {error}")
    t_ref = top.number("reference_temperature_c", 20.0, low=-30.0, high=60.0, unit="°C") + ZERO_CELSIUS
    wall = top.number("wall_mm", None, low=0.1, high=50.0, unit="mm")
    wall_m = None if wall is None else wall * 1e-3
    transposition = top.data.get("transposition_semitones", 0)
    if isinstance(transposition, bool) or not isinstance(transposition, int) \
            or abs(transposition) > MAX_TRANSPOSITION:
        top.fail("transposition_semitones", f"= {short_repr(transposition)} must be a whole number from "
                 f"-{MAX_TRANSPOSITION} to {MAX_TRANSPOSITION} (written minus sounding pitch)")

    bore = top.table("bore", BORE_KEYS, required=True)
    stations = parse_stations(bore)

    inp = _input_end(top, excitation, stations)
    default_chimney = wall_m
    if default_chimney is None:
        default_chimney = DEFAULT_WALL
        if material_name is not None:
            default_chimney = material(material_name).wall_thickness
    holes = []
    length = stations[-1, 0]
    for t in top.tables("hole", HOLE_KEYS):
        hname = t.string("name", required=True)
        if hname in [h.name for h in holes]:
            t.fail("name", f"= '{hname}' is used by another hole; hole names must be unique")
        low = inp.embouchure_position_m * 1e3 if excitation == "jet" else 0.0
        pos = t.number("position_mm", required=True, low=low, high=length * 1e3, unit="mm")
        if excitation == "jet" and pos <= low:
            t.fail("position_mm", f"= {pos:g} must lie beyond the embouchure ({low:g} mm)")
        local_d = float(np.interp(pos * 1e-3, stations[:, 0], stations[:, 1]))
        dia = t.number("diameter_mm", required=True, low=0.1, high=local_d * 1e3, unit="mm (at most the bore)")
        chim = t.number("chimney_mm", default_chimney * 1e3, low=0.0, high=100.0, unit="mm")
        holes.append(Hole(hname, pos * 1e-3, dia * 1e-3, chim * 1e-3))

    _check_hole_spacing(top, holes)
    names = [h.name for h in holes]
    valves = parse_valves(top, stations, holes)
    slide = parse_slide(top, stations)
    notes = []
    for t in top.tables("note", NOTE_KEYS):
        nname = t.string("name", required=True)
        try:
            note_to_midi(nname)
        except ValueError as error:
            t.fail("name", f"= '{nname}': {error}")
        closed = t.names("closed", names, "hole")
        register = t.data.get("register", 1)
        if isinstance(register, bool) or not isinstance(register, int) or not 1 <= register <= 12:
            t.fail("register", f"= {short_repr(register)} must be a whole number from 1 to 12")
        notes.append(Note(nname, tuple(closed), register, *parse_note_path(t, valves, slide)))

    d = top.table("design", DESIGN_KEYS)
    design = Design(
        temperature_k=d.number("temperature_c", 20.0, low=-30.0, high=60.0, unit="°C") + ZERO_CELSIUS,
        relative_humidity=d.number("relative_humidity_pct", 50.0, low=0.0, high=100.0, unit="%") / 100.0,
        pressure_pa=d.number("pressure_kpa", STANDARD_PRESSURE / 1e3, low=50.0, high=110.0, unit="kPa") * 1e3,
        co2_fraction=d.number("co2_ppm", DEFAULT_CO2_FRACTION * 1e6, low=0.0, high=100000.0, unit="ppm") * 1e-6,
        playing=d.boolean("playing", False),
        a4_hz=d.number("a4_hz", A4_HZ, low=380.0, high=480.0, unit="Hz"),
    )

    tuning = None
    if top.has("tuning"):
        tt = top.table("tuning", TUNING_KEYS)
        lo = inp.embouchure_position_m * 1e3 if excitation == "jet" else 0.0
        pos = tt.number("position_mm", required=True, low=lo, high=length * 1e3, unit="mm")
        mn = tt.number("min_change_mm", DEFAULT_MIN_CHANGE * 1e3, low=-50.0, high=0.0, unit="mm")
        mx = tt.number("max_change_mm", DEFAULT_MAX_CHANGE * 1e3, low=0.0, high=50.0, unit="mm")
        for h in holes:
            if abs(h.position_m - pos * 1e-3) < h.diameter_m / 2:
                tt.fail("position_mm", f"= {pos:g} lies within hole {h.name}; put the joint between holes")
        for v in valves:
            if abs(v.position_m - pos * 1e-3) < 1e-9:
                tt.fail("position_mm", f"= {pos:g} is where valve {v.name} sits; put the joint beside it")
        tuning = Tuning(pos * 1e-3, mn * 1e-3, mx * 1e-3)

    return Instrument(
        name=name, excitation=excitation, stations_m=stations, holes=tuple(holes), notes=tuple(notes),
        input_end=inp, design=design, tuning=tuning, material=material_name, reference_temperature_k=t_ref,
        valves=tuple(valves), slide=slide,
        wall_m=wall_m, description=description, source=str(path), transposition_semitones=transposition,
    )


def _input_end(top: Table, excitation: str, stations: np.ndarray) -> InputEnd:
    if excitation == "reed" and top.has("input") and isinstance(top.data["input"], dict) \
            and "added_volume_mm3" in top.data["input"]:
        top.fail("[input] added_volume_mm3", "is replaced by reed_volume_mm3 (the reed's equivalent volume "
                 "at 101.325 kPa) and cavity_volume_mm3 (a mouthpiece cavity or missing cone tip)")
    t = top.table("input", INPUT_KEYS[excitation])
    if excitation == "reed":
        v = t.number("reed_volume_mm3", DEFAULT_REED_VOLUME * 1e9, low=0.0, high=1e6, unit="mm³")
        cavity = t.number("cavity_volume_mm3", 0.0, low=0.0, high=1e6, unit="mm³")
        return InputEnd("reed", added_volume_m3=cavity * 1e-9,
                        reed_compliance_m3_pa=v * 1e-9 / (REED_REFERENCE_GAMMA * REED_REFERENCE_PRESSURE))
    if excitation == "lips":
        return InputEnd(
            "lips",
            added_volume_m3=t.number("cup_volume_mm3", DEFAULT_CUP_VOLUME * 1e9, low=0.0, high=1e6, unit="mm³") * 1e-9,
            throat_diameter_m=t.number("throat_diameter_mm", DEFAULT_THROAT_DIAMETER * 1e3, low=0.5, high=50.0, unit="mm") * 1e-3,
            throat_length_m=t.number("throat_length_mm", DEFAULT_THROAT_LENGTH * 1e3, low=0.0, high=100.0, unit="mm") * 1e-3,
            backbore_length_m=t.number("backbore_length_mm", DEFAULT_BACKBORE_LENGTH * 1e3, low=0.0, high=300.0, unit="mm") * 1e-3,
        )
    length = stations[-1, 0] * 1e3
    pos = t.number("embouchure_position_mm", 0.0, low=0.0, high=length / 2, unit="mm")
    dia_max = float(np.interp(pos * 1e-3, stations[:, 0], stations[:, 1])) * 1e3
    dia = t.number("embouchure_diameter_mm", min(DEFAULT_EMBOUCHURE_DIAMETER * 1e3, dia_max),
                   low=0.5, high=dia_max, unit="mm (at most the bore)")
    chim = t.number("embouchure_chimney_mm", DEFAULT_EMBOUCHURE_CHIMNEY * 1e3, low=0.0, high=50.0, unit="mm")
    outer = t.number("embouchure_outer_correction_mm", None, low=0.0, high=100.0, unit="mm")
    cover = t.number("lip_cover_pct", None, low=0.0, high=MAX_LIP_COVER * 100, unit="%")
    if outer is not None and cover is not None:
        t.fail("lip_cover_pct", "and embouchure_outer_correction_mm both set the embouchure's outer end "
                                "correction: give one of them")
    return InputEnd("jet", embouchure_position_m=pos * 1e-3, embouchure_diameter_m=dia * 1e-3,
                    embouchure_chimney_m=chim * 1e-3,
                    embouchure_outer_correction_m=None if outer is None else outer * 1e-3,
                    lip_cover=DEFAULT_LIP_COVER if cover is None else cover / 100)


def _check_hole_spacing(top, holes) -> None:
    """Refuse two holes at one position, or whose edges along the bore are closer than
    :data:`MIN_HOLE_GAP`, naming both."""
    ordered = sorted(holes, key=lambda h: h.position_m)
    for a, b in zip(ordered, ordered[1:]):
        where = f"[[hole]] '{a.name}' and '{b.name}'"
        if abs(b.position_m - a.position_m) < 1e-9:
            raise InputFileError(f"{top.path}: {where} sit at one position ({a.position_m * 1e3:g} mm); "
                                 "give each hole its own position_mm")
        gap = (b.position_m - b.diameter_m / 2) - (a.position_m + a.diameter_m / 2)
        if gap < MIN_HOLE_GAP:
            raise InputFileError(f"{top.path}: {where} overlap or nearly touch (edges {gap * 1e3:.2f} mm apart); "
                                 f"their edges must be at least {MIN_HOLE_GAP * 1e3:g} mm apart along the bore")


def _bundled_dir():
    return resources.files("drift.data.instruments")


def load_instrument(source: str | Path) -> Instrument:
    """An instrument by bundled name (see :func:`bundled_instruments`) or by path to a TOML file.

    Parameters
    ----------
    source : str or path
        A bundled name, or the path of an instrument file (docs/formats.md). A value naming an
        existing file, ending in ``.toml`` or holding a ``/`` is read as a path.

    Returns
    -------
    Instrument
        Dimensions in SI units, as drawn at ``reference_temperature_k``.

    Raises
    ------
    drift.errors.InputFileError
        For unknown names (with a did-you-mean suggestion and the bundled names) and for any
        bad key or value, naming the file and the key.

    Examples
    --------
    >>> from drift import load_instrument
    >>> load_instrument("cylindrical-reed").excitation
    'reed'
    """
    data, label = load_named(source, _bundled_dir(), "drift/data/instruments", "instrument")
    return parse_instrument(data, label)


def bundled_instrument_text(name: str) -> str:
    """The file of a bundled instrument as text (docs/formats.md): a start for one's own."""
    return bundled_text(name, _bundled_dir(), "instrument")


def bundled_instruments() -> list[Instrument]:
    """Every bundled instrument (invented demonstration instruments), sorted by name.

    Examples
    --------
    >>> from drift import bundled_instruments
    >>> [i.name for i in bundled_instruments()][:3]
    ['conical-reed', 'cylindrical-reed', 'double-reed']
    """
    return [load_instrument(name) for name in sorted(bundled_files(_bundled_dir()))]
