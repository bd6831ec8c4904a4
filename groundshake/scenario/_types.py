"""The scenario's frozen dataclasses; their fields are the schema.

Each field's ``metadata`` says what the TOML key accepts (kind, range, unit,
a one-line description), so validation, the README table and ``to_dict`` all
come from the same declarations. Attribute names equal the TOML key names.
The ``[processing]`` table is the processing stage's own
:class:`~groundshake.processing.ProcessingSettings`, declared there once with plain
metadata (doc, unit, limits) that the spec engine reads as a table of its keys.
Units: SI (m, kg, Pa, s, Hz); damping in percent, as written in the file.
"""
from __future__ import annotations

import dataclasses
import os
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Literal

from ..processing import ProcessingSettings

__all__ = [
    "Scenario",
    "MotionComponent",
    "MotionSettings",
    "Material",
    "Part",
    "MeshSettings",
    "SupportSettings",
    "StrainCompatible",
    "DampingSettings",
    "AnchorCapacity",
    "FpParameters",
    "Equipment",
    "Sensor",
    "AnalysisSettings",
    "PeriodRange",
    "FloorSpectraSettings",
    "SuiteSettings",
    "RECORD_UNITS",
]

#: Canonical record units (other spellings, such as gal or m/s^2, are accepted and mapped).
RECORD_UNITS = ("g", "m/s2", "cm/s2", "mm/s2", "ft/s2", "in/s2")

_MISSING = dataclasses.MISSING
_KEEP_MARK = object()  # "leave as it is" for Scenario.with_motion

def percent_to_ratio(percent: float) -> float:
    """A percentage as a ratio (5 → 0.05): the one place where the scenario's damping and
    broadening in percent become the ratios the computations use."""
    return float(percent) / 100.0


#: The reading and writing functions of the loader (``_load.py``), registered there when the
#: package is imported, so that these data types do not import their loader (no cycle).
_CODEC: dict[str, Any] = {}


def spec(kind: str, default: Any = _MISSING, *, doc: str, unit: str = "",
         factory: Any = _MISSING, derived: str | None = None, **rules: Any):
    """A dataclass field that also describes its TOML key.

    ``kind`` is one of number, integer, bool, string, choice, units, vector,
    numbers, points, path, trace, target, table, array, named; ``rules`` holds range
    limits (gt, ge, lt, le), ``choices``, ``length``, ``cls`` and ``allowed``
    (text overriding the generated one). No default means the key is required;
    ``derived`` names a default that is computed from other keys.
    """
    meta = {"kind": kind, "doc": doc, "unit": unit, "derived": derived, **rules}
    if factory is not _MISSING:
        return field(default_factory=factory, metadata=meta)
    return field(default=default, metadata=meta)


def _internal(default: Any = _MISSING, factory: Any = _MISSING):
    meta = {"internal": True}
    if factory is not _MISSING:
        return field(default_factory=factory, metadata=meta, compare=False)
    return field(default=default, metadata=meta, compare=False)


# --- motion ------------------------------------------------------------------------------

@dataclass(frozen=True, kw_only=True)
class MotionComponent:
    """One ground-motion component: a record file and how to read it."""

    file: Path = spec("path", doc="record file, relative to the scenario file")
    units: str | None = spec("units", None,
                             doc="units of the record (stored by its canonical name); "
                                 "none = as the file says")
    scale: float = spec("number", 1.0, nonzero=True, doc="factor applied to the record")
    dt: float | None = spec("number", None, gt=0.0, unit="s",
                            doc="time step, for one-column text files")
    trace: int | str | None = spec("trace", None,
                                   doc="trace index (from 0) or channel code in a multi-trace file")
    channel: str | None = spec("string", None,
                               doc="the channel of a multi-channel file by its code as written "
                                   "(`360`, `HNZ`, `UP`) or the record's name")
    azimuth: float | None = spec("number", None, ge=0.0, le=360.0, unit="deg",
                                 doc="the horizontal channel of a multi-channel file whose "
                                     "azimuth (clockwise from north, from its header) is this, "
                                     "within 1°")


@dataclass(frozen=True, kw_only=True)
class MotionSettings:
    """The ``[motion]`` table: up to three components; ``z`` is vertical."""

    x: MotionComponent | None = spec("table", None, cls=MotionComponent,
                                     doc="horizontal component along x")
    y: MotionComponent | None = spec("table", None, cls=MotionComponent,
                                     doc="horizontal component along y")
    z: MotionComponent | None = spec("table", None, cls=MotionComponent,
                                     doc="vertical component")
    file: Path | None = spec("path", None,
                             doc="one station file holding the components, instead of x, y, z: "
                                 "its vertical channel goes to z, its horizontals to x and y in "
                                 "the file's order (written out as x, y, z with their channels)")
    target: str | None = spec("target", None,
                              doc="target spectrum: a spec such as `asce7:sds=1.0,sd1=0.6,tl=8`, "
                                  "a CSV of period [s], PSA [g], or a CSMIP Volume 3 file "
                                  "`FILE.V3:channel=N` (relative paths)")
    match_target: bool = spec("bool", False, doc="adjust the records to the target first")
    target_z: str | None = spec("target", None,
                                doc="vertical design spectrum of the spectrum method (same forms "
                                    "as target); none = vertical_fraction × target")
    vertical_fraction: float = spec("number", 2.0 / 3.0, ge=0.0, le=2.0,
                                    doc="vertical spectrum as a share of the horizontal target "
                                        "when target_z is not given (2/3: USNRC RG 1.60 and "
                                        "ASCE 4 long-period ratio, from memory); 0 = no vertical")
    inventory: Path | None = spec("path", None,
                                  doc="station inventory (StationXML) of records in raw counts "
                                      "(MiniSEED, SAC), relative to the scenario file")

    def components(self) -> dict[str, MotionComponent]:
        """The given components in x, y, z order, keyed by axis name."""
        return {k: v for k, v in (("x", self.x), ("y", self.y), ("z", self.z)) if v is not None}


# --- model -------------------------------------------------------------------------------

@dataclass(frozen=True, kw_only=True)
class Material:
    """A ``[materials.NAME]`` table: isotropic linear elasticity."""

    youngs_modulus: float = spec("number", gt=0.0, unit="Pa", doc="Young's modulus E")
    poisson_ratio: float = spec("number", ge=0.0, lt=0.5, doc="Poisson's ratio ν")
    density: float = spec("number", gt=0.0, unit="kg/m³", doc="mass density ρ")


@dataclass(frozen=True, kw_only=True)
class Part:
    """A ``[[parts]]`` entry: a rectangular box on the model's common grid."""

    name: str = spec("string", doc="name, unique among the parts")
    material: str = spec("string", doc="name of a `[materials.NAME]` table")
    origin: tuple[float, float, float] = spec("vector", length=3, unit="m",
                                              doc="corner with the least x, y, z")
    size: tuple[float, float, float] = spec("vector", length=3, gt=0.0, unit="m",
                                            doc="lengths along x, y, z")

    @property
    def upper(self) -> tuple[float, float, float]:
        """Corner with the greatest x, y, z [m]."""
        return tuple(o + s for o, s in zip(self.origin, self.size))  # type: ignore[return-value]


@dataclass(frozen=True, kw_only=True)
class MeshSettings:
    """The ``[mesh]`` table."""

    element_size: float = spec("number", gt=0.0, unit="m",
                               doc="target element size; grid lines also fall on faces, "
                                   "footprints and sensors")
    element: Literal["hex8-incompatible", "hex8"] = spec(
        "choice", "hex8-incompatible", choices=("hex8-incompatible", "hex8"),
        doc="brick with incompatible modes, or the plain trilinear brick")
    mass: Literal["consistent", "lumped"] = spec(
        "choice", "consistent", choices=("consistent", "lumped"), doc="mass matrix")


@dataclass(frozen=True, kw_only=True)
class StrainCompatible:
    """Reduction of the soil's shear modulus with the level of shaking (soil only).

    Effective shear modulus ratio G/G0 by site class and S_DS/2.5 (ASCE 7-16
    Table 19.2-1, from memory; linear interpolation between its columns).
    """

    site_class: Literal["A", "B", "C", "D", "E"] = spec(
        "choice", choices=("A", "B", "C", "D", "E"), doc="site class of the table")
    shaking_g: float = spec("number", ge=0.0, unit="g",
                            doc="level of shaking S_DS/2.5 (or the site's PGA)")


@dataclass(frozen=True, kw_only=True)
class SupportSettings:
    """The ``[support]`` table; the soil keys are required when ``kind = "soil"``."""

    kind: Literal["fixed", "soil"] = spec("choice", "fixed", choices=("fixed", "soil"),
                                          doc="base face fixed to the ground, or on soil springs")
    shear_wave_velocity: float | None = spec("number", None, gt=0.0, unit="m/s",
                                             doc="soil shear-wave velocity (soil only)")
    poisson_ratio: float | None = spec("number", None, ge=0.0, lt=0.5,
                                       doc="soil Poisson's ratio (soil only)")
    density: float | None = spec("number", None, gt=0.0, unit="kg/m³",
                                 doc="soil mass density (soil only)")
    radiation_damping: bool = spec("bool", True, doc="add radiation dashpots (soil only)")
    springs: Literal["lumped", "distributed"] = spec(
        "choice", "lumped", choices=("lumped", "distributed"),
        doc="six springs at a rigid base, or a uniform spring bed with the same translation totals")
    embedment_depth: float = spec("number", 0.0, ge=0.0, unit="m",
                                  doc="depth of the base below grade (soil only; Gazetas 1991 "
                                      "embedment factors)")
    sidewall_contact_depth: float | None = spec(
        "number", None, ge=0.0, unit="m", derived="embedment_depth",
        doc="height of the side walls in good contact with the soil (soil only)")
    frequency_dependent: bool = spec(
        "bool", False, doc="evaluate each base spring at the frequency of the modes that "
                           "load it (Gazetas 1991 k(a0), iterated; soil only); in direct "
                           "runs rocking and torsion as rotational cones (Wolf 1994)")
    variation: float | None = spec("number", None, ge=0.0, le=10.0,
                                   doc="Cv of the shear modulus: lower, best and upper cases "
                                       "G/(1+Cv), G, G(1+Cv); none = best estimate only")
    modulus_ratio: float | None = spec("number", None, gt=0.0, le=1.0,
                                       doc="strain-compatible G/G0 as entered (soil only)")
    strain_compatible: StrainCompatible | None = spec(
        "table", None, cls=StrainCompatible,
        doc="G/G0 from the level of shaking {site_class, shaking_g} (soil only)")
    friction_coefficient: float | None = spec(
        "number", None, gt=0.0, doc="base friction coefficient μ for the sliding check; "
                                    "none = no sliding check")
    passive_resistance: float = spec("number", 0.0, ge=0.0, unit="N",
                                     doc="horizontal resistance added to friction (user entered)")
    allowable_bearing_pressure: float | None = spec(
        "number", None, gt=0.0, unit="Pa", doc="allowable bearing pressure for the screening "
                                               "ratio; none = no comparison")


@dataclass(frozen=True, kw_only=True)
class DampingSettings:
    """The ``[damping]`` table."""

    ratio_percent: float = spec("number", 5.0, ge=0.0, lt=100.0, unit="%",
                                doc="modal damping of the block")
    rayleigh_hz: tuple[float, float] | None = spec(
        "vector", None, length=2, gt=0.0, unit="Hz",
        doc="two frequencies f1 < f2 for a Rayleigh matrix; none = modal damping")

    @property
    def ratio(self) -> float:
        """The block's damping as a ratio (``ratio_percent`` / 100)."""
        return percent_to_ratio(self.ratio_percent)


# --- equipment and sensors ---------------------------------------------------------------

@dataclass(frozen=True, kw_only=True)
class AnchorCapacity:
    """User-supplied capacity of one anchor bolt [N]."""

    tension: float = spec("number", gt=0.0, unit="N", doc="tension capacity per bolt")
    shear: float = spec("number", gt=0.0, unit="N", doc="shear capacity per bolt")
    interaction: Literal["5/3-power", "trilinear"] = spec(
        "choice", "5/3-power", choices=("5/3-power", "trilinear"),
        doc="tension-shear interaction: (T/Tc)^5/3 + (V/Vc)^5/3, or the trilinear form")


@dataclass(frozen=True, kw_only=True)
class FpParameters:
    """Inputs of the ASCE 7-16 §13.3.1 equivalent static force Fp (for comparison)."""

    sds: float = spec("number", gt=0.0, unit="g", doc="design spectral acceleration S_DS")
    ap: float = spec("number", gt=0.0, doc="component amplification factor a_p")
    rp: float = spec("number", gt=0.0, doc="component response modification factor R_p")
    ip: float = spec("number", 1.0, gt=0.0, doc="component importance factor I_p")
    z_over_h: float = spec("number", 0.0, ge=0.0, le=1.0,
                           doc="height of attachment over roof height z/h (0 at grade)")


@dataclass(frozen=True, kw_only=True)
class Equipment:
    """An ``[[equipment]]`` entry: a lumped mass on the top face."""

    name: str = spec("string", doc="name, unique among the equipment")
    mass: float = spec("number", gt=0.0, unit="kg", doc="total mass")
    mount: tuple[float, float] = spec("vector", length=2, unit="m",
                                      doc="x, y of the footprint centre on a top face")
    footprint: tuple[float, float] = spec("vector", length=2, gt=0.0, unit="m",
                                          doc="footprint lengths along x, y")
    cg_height: float = spec("number", ge=0.0, unit="m",
                            doc="height of the centre of gravity above the mount")
    frequency_hz: tuple[float, float, float] | None = spec(
        "vector", None, length=3, gt=0.0, unit="Hz",
        doc="support frequencies in x, y, z; none = rigidly attached")
    damping_percent: float | None = spec("number", None, ge=0.0, lt=100.0, unit="%",
                                         derived="damping.ratio_percent",
                                         doc="damping of the flexible support")
    rotary_inertia: tuple[float, float, float] | None = spec(
        "vector", None, length=3, ge=0.0, unit="kg·m²",
        derived="solid box: footprint × 2·cg_height",
        doc="rotary inertia about the CG, axes x, y, z")
    anchors: tuple[tuple[float, float], ...] = spec(
        "points", (), unit="m", doc="bolt positions [[x, y], ...] from the mount")
    dead_load_factor: float = spec("number", 0.9, ge=0.0, le=1.0,
                                   doc="share of the weight that resists uplift (default 0.9: "
                                       "0.9D with E, ASCE 7-16 §2.3.6, from memory)")
    capacity: AnchorCapacity | None = spec("table", None, cls=AnchorCapacity,
                                           doc="bolt capacities {tension, shear}, user supplied")
    fp: FpParameters | None = spec("table", None, cls=FpParameters,
                                   doc="ASCE 7-16 Fp inputs {sds, ap, rp, ip, z_over_h}")

    @property
    def damping_ratio(self) -> float | None:
        """The support's damping as a ratio, or None when not given (the block's then)."""
        return None if self.damping_percent is None else percent_to_ratio(self.damping_percent)


@dataclass(frozen=True, kw_only=True)
class Sensor:
    """A ``[[sensors]]`` entry: a point where responses are reported."""

    name: str = spec("string", doc="name, unique among the sensors")
    at: tuple[float, float, float] = spec("vector", length=3, unit="m",
                                          doc="position, inside or on a part")


# --- analysis and outputs ----------------------------------------------------------------

@dataclass(frozen=True, kw_only=True)
class AnalysisSettings:
    """The ``[analysis]`` table."""

    method: Literal["auto", "modal", "coupled", "direct", "spectrum"] = spec(
        "choice", "auto", choices=("auto", "modal", "coupled", "direct", "spectrum"),
        doc="auto: coupled where damping is non-classical (soil or equipment dashpots), "
            "else modal; modal superposition with missing mass; coupled: the whole damping "
            "matrix on the modes and missing-mass vectors; direct integration; or "
            "response-spectrum analysis of [motion] target (CQC, missing mass at the ZPA)")
    direction_combination: Literal["srss", "100-40-40"] = spec(
        "choice", "srss", choices=("srss", "100-40-40"),
        doc="spectrum method: how the peaks of ground x, y, z are combined")
    spectrum_motions: int = spec("integer", 0, ge=0, le=30,
                                 doc="spectrum method: invented motions matched to the design "
                                     "spectra and run by modal time history, for floor spectra "
                                     "(their mean) and a side-by-side table; 0 = none")
    cutoff_hz: float = spec("number", 50.0, gt=0.0, unit="Hz", doc="modes up to this frequency")
    modes: int | None = spec("integer", None, ge=1, le=10000,
                             doc="a fixed number of modes instead of the cutoff")
    hht_alpha: float = spec("number", 0.0, ge=-1.0 / 3.0, le=0.0,
                            allowed="a number in [-1/3, 0]",
                            doc="HHT-α of direct integration (0 = average acceleration)")
    solver: Literal["auto", "scipy", "pardiso"] = spec(
        "choice", "auto", choices=("auto", "scipy", "pardiso"), doc="sparse solver")


@dataclass(frozen=True, kw_only=True)
class PeriodRange:
    """Log-spaced periods for floor spectra."""

    min: float = spec("number", 0.02, gt=0.0, unit="s", doc="shortest period")
    max: float = spec("number", 5.0, gt=0.0, unit="s", doc="longest period")
    count: int = spec("integer", 120, ge=2, le=100000, doc="number of periods")


@dataclass(frozen=True, kw_only=True)
class FloorSpectraSettings:
    """The ``[floor_spectra]`` table."""

    damping_percent: tuple[float, ...] = spec("numbers", (2.0, 5.0), ge=0.0, lt=100.0, unit="%",
                                              doc="oscillator damping values")
    broadening_percent: float = spec("number", 15.0, ge=0.0, le=50.0, unit="%",
                                     doc="peak broadening, ± percent of the period")
    periods: PeriodRange = spec("table", factory=PeriodRange, cls=PeriodRange,
                                doc="period range {min, max, count}")

    @property
    def damping_ratios(self) -> tuple[float, ...]:
        """The oscillator damping values as ratios."""
        return tuple(percent_to_ratio(p) for p in self.damping_percent)

    @property
    def broadening_ratio(self) -> float:
        """The peak broadening as a share of the period (``broadening_percent`` / 100)."""
        return percent_to_ratio(self.broadening_percent)


@dataclass(frozen=True, kw_only=True)
class ReportSettings:
    """The ``[report]`` table."""

    units: str = spec("choice", "si", choices=("si", "us"),
                      doc="display units of report.html: si (kN, mm, MPa) or us (kip, in, psi)")


@dataclass(frozen=True, kw_only=True)
class SuiteSettings:
    """The ``[suite]`` table: used by ``groundshake suite`` only (its options override it)."""

    scale_to: str | None = spec("target", None,
                                doc="scale each record set to this target before it runs "
                                    "(same forms as motion.target); none = records as given")
    scale_rule: Literal["asce7-16", "asce7-10", "en1998"] = spec(
        "choice", "asce7-16", choices=("asce7-16", "asce7-10", "en1998"),
        doc="scaling band, share of the target and horizontal spectrum (from memory of the "
            "standards)")
    scale_mode: Literal["record", "set"] = spec(
        "choice", "record", choices=("record", "set"),
        doc="record: each set fitted first, then one common factor; set: one common factor")
    scale_range: tuple[float, ...] = spec("numbers", (0.25, 4.0), gt=0.0,
                                          doc="[low, high]: factors outside are warned about")
    scale_period: float | None = spec("number", None, gt=0.0, unit="s",
                                      doc="fundamental period that sets the band; none = the "
                                          "model's first mode")


# --- the scenario ------------------------------------------------------------------------

@dataclass(frozen=True, kw_only=True)
class Scenario:
    """A validated scenario. Build one with :func:`load_scenario` or :meth:`from_dict`.

    Attribute names equal the TOML keys; units are SI, damping in percent.
    ``source`` is the scenario file (or ``"<dict>"``), ``base_dir`` the folder
    relative paths were resolved against, and ``notes`` lists things the
    summary should show (paths leaving the scenario's folder, doubtful input).
    """

    title: str = spec("string", derived="file name without extension", doc="title of the run")
    motion: MotionSettings | None = spec("table", None, cls=MotionSettings,
                                         doc="ground motion; may be left out (modes only)")
    processing: ProcessingSettings = spec("table", factory=ProcessingSettings,
                                          cls=ProcessingSettings, doc="record processing")
    materials: dict[str, Material] = spec("named", cls=Material, doc="materials by name")
    parts: tuple[Part, ...] = spec("array", cls=Part, doc="boxes of the model")
    mesh: MeshSettings = spec("table", cls=MeshSettings, doc="mesh")
    support: SupportSettings = spec("table", factory=SupportSettings, cls=SupportSettings,
                                    doc="support of the base face")
    damping: DampingSettings = spec("table", factory=DampingSettings, cls=DampingSettings,
                                    doc="damping of the block")
    equipment: tuple[Equipment, ...] = spec("array", (), cls=Equipment,
                                            doc="equipment on the top face")
    sensors: tuple[Sensor, ...] = spec("array", (), cls=Sensor, doc="response points")
    analysis: AnalysisSettings = spec("table", factory=AnalysisSettings, cls=AnalysisSettings,
                                      doc="analysis")
    floor_spectra: FloorSpectraSettings = spec("table", factory=FloorSpectraSettings,
                                               cls=FloorSpectraSettings, doc="floor spectra")
    report: ReportSettings = spec("table", factory=ReportSettings, cls=ReportSettings,
                                  doc="report display")
    suite: SuiteSettings | None = spec("table", None, cls=SuiteSettings,
                                       doc="record suites: scaling to a target")
    source: str = _internal("<dict>")
    base_dir: Path = _internal(factory=Path.cwd)
    notes: tuple[str, ...] = _internal(())
    #: Line of each key in the scenario text (key path → 1-based line), for messages of
    #: errors met after loading (:func:`groundshake.scenario.errors_at_key`); None for a
    #: scenario built from a dict.
    key_lines: dict | None = _internal(None)

    @classmethod
    def from_dict(cls, d: dict, *, source: str = "<dict>",
                  base_dir: str | os.PathLike | None = None) -> "Scenario":
        """Validate nested dicts (as from ``tomllib`` or :meth:`to_dict`) into a Scenario.

        ``base_dir`` (default: the current folder) resolves relative paths; ``None``
        values count as absent keys. Raises ``ScenarioError`` like :func:`load_scenario`.
        """
        return _CODEC["from_dict"](d, source=source, base_dir=base_dir)

    def to_dict(self) -> dict:
        """Every key with its value or default (JSON-able; paths as absolute strings).

        The result goes back through :meth:`from_dict` to an equal scenario. It also
        carries ``"notes"`` (list of str, see :attr:`notes`), so any output that echoes
        the scenario shows them; ``from_dict`` ignores that entry.
        """
        return _CODEC["to_dict"](self)

    def with_motion(self, *, x: Any = None, y: Any = None, z: Any = None,
                    target: Any = _KEEP_MARK, match_target: Any = _KEEP_MARK) -> "Scenario":
        """A copy with another ground motion (the suite runner swaps records in).

        Each of ``x``, ``y``, ``z`` is a record path (absolute, or relative to
        :attr:`base_dir`), a :class:`MotionComponent`, or ``None`` for no
        component; components not given are absent in the copy. ``target`` and
        ``match_target`` are kept from this scenario unless given. With no
        component at all the copy has ``motion = None``.
        """
        return _CODEC["replace_motion"](self, {"x": x, "y": y, "z": z},
                                        target, match_target, _KEEP_MARK)

    def processing_settings(self) -> ProcessingSettings:
        """How the records are corrected: the ``[processing]`` table, which is a
        :class:`groundshake.processing.ProcessingSettings` (its fields are the table's keys)."""
        return self.processing

    def estimated_dofs(self) -> float:
        """Rough number of degrees of freedom of the mesh (3 per grid node); an estimate."""
        from ._geometry import estimated_dofs
        return estimated_dofs(self.parts, self.mesh.element_size)

    def mount_position(self, equipment: int | str) -> tuple[float, float, float]:
        """Point [m] where an equipment's footprint centre sits on the top face.

        ``equipment`` is an index into :attr:`equipment` or a name.
        """
        from ._geometry import _tolerance, top_face_height
        if isinstance(equipment, str):
            matches = [e for e in self.equipment if e.name == equipment]
            if not matches:
                raise KeyError(equipment)
            e = matches[0]
        else:
            e = self.equipment[equipment]
        z, _ = top_face_height(self.parts, e.mount, e.footprint, _tolerance(self.parts))
        return (e.mount[0], e.mount[1], z)
