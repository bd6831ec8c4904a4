"""Synthetic demo records by the stochastic method (Boore 2003).

The demo motion shipped in ``records/`` is made here, from a fixed seed and the
parameters of an invented scenario of our own (no real earthquake, station or
site). Rerun with ``python -m groundshake.records.synthetic OUTDIR``.

Method (Boore 2003, PAGEOPH 160, 635-676): Gaussian white noise is shaped in
time by a Saragoni-Hart window whose length follows the source and path
durations; its Fourier spectrum is normalised to unit mean square amplitude and
multiplied by the target Fourier amplitude spectrum of acceleration

    A(f) = C·M0·(2πf)² / (1 + (f/fc)²) · G(R) · exp(-πfR / (Q(f)·β)) · exp(-πκ0·f)

with C = Rθφ·V·F / (4π·ρ·β³·R0), the ω² (Brune) source, corner frequency
fc = 4.906e6·β·(Δσ/M0)^(1/3) (β km/s, Δσ bar, M0 dyne·cm), M0 from the moment
magnitude (Hanks & Kanamori 1979), geometric spreading 1/R, anelastic Q(f) and
the high-frequency diminution κ0 (Anderson & Hough 1984), times a smooth site gain.
"""
from __future__ import annotations

import argparse
import sys
from dataclasses import dataclass
from pathlib import Path

import numpy as np

from ._record import Record
from ._write import write_record

__all__ = ["StochasticScenario", "DEMO_SCENARIO", "DEMO_SEED", "stochastic_acceleration",
           "target_fourier_amplitude", "demo_records", "make_demo_records"]

#: Seed of the demo records.
DEMO_SEED = 20260630


@dataclass(frozen=True)
class StochasticScenario:
    """Parameters of one stochastic simulation (Boore 2003). Invented values for the demo.

    Attributes
    ----------
    magnitude : float
        Moment magnitude Mw.
    distance_km : float
        Hypocentral distance R [km].
    stress_drop_bar : float
        Brune stress parameter Δσ [bar].
    beta_km_s, density_g_cm3 : float
        Shear-wave velocity [km/s] and density [g/cm³] at the source.
    kappa_s : float
        κ0 [s].
    q0, q_exponent : float
        Q(f) = q0·f^q_exponent (floored at q0/2).
    radiation, partition, free_surface : float
        Rθφ (average radiation pattern), V (horizontal partition 1/√2), F (free surface).
    path_duration_per_km : float
        Path duration [s/km] added to the source duration 1/fc.
    window_eps, window_eta, window_factor : float
        Saragoni-Hart window shape ε, η and window length over the duration.
    site_gain, site_gain_hz : float
        A smooth site amplification 1 + (gain - 1)·f²/(f² + f_g²), rising from 1 at
        low frequency to ``site_gain`` well above ``site_gain_hz`` (invented shape).
    """

    magnitude: float = 6.5
    distance_km: float = 15.0
    stress_drop_bar: float = 100.0
    beta_km_s: float = 3.5
    density_g_cm3: float = 2.8
    kappa_s: float = 0.035
    q0: float = 180.0
    q_exponent: float = 0.45
    radiation: float = 0.55
    partition: float = 2.0 ** -0.5
    free_surface: float = 2.0
    path_duration_per_km: float = 0.05
    window_eps: float = 0.2
    window_eta: float = 0.05
    window_factor: float = 2.0
    site_gain: float = 2.0
    site_gain_hz: float = 1.0

    @property
    def moment_dyne_cm(self) -> float:
        """Seismic moment [dyne·cm], Mw = (2/3)·log10(M0) - 10.7."""
        return 10.0 ** (1.5 * self.magnitude + 16.05)

    @property
    def corner_hz(self) -> float:
        """Brune corner frequency fc [Hz]."""
        return 4.906e6 * self.beta_km_s * (self.stress_drop_bar / self.moment_dyne_cm) ** (1 / 3)

    @property
    def duration_s(self) -> float:
        """Ground-motion duration [s]: source 1/fc plus path."""
        return 1.0 / self.corner_hz + self.path_duration_per_km * self.distance_km


#: The invented scenario of the demo records.
DEMO_SCENARIO = StochasticScenario()


def target_fourier_amplitude(freq, scenario: StochasticScenario = DEMO_SCENARIO) -> np.ndarray:
    """Target Fourier amplitude of acceleration [m/s], shape of ``freq`` [Hz] (Boore 2003 eq. 2-5)."""
    s = scenario
    f = np.asarray(freq, dtype=float)
    c = (s.radiation * s.partition * s.free_surface
         / (4 * np.pi * s.density_g_cm3 * s.beta_km_s ** 3) * 1e-20)  # cm with R0 = 1 km
    source = c * s.moment_dyne_cm * (2 * np.pi * f) ** 2 / (1 + (f / s.corner_hz) ** 2)
    q = np.maximum(s.q0 * np.maximum(f, 1e-12) ** s.q_exponent, s.q0 / 2)
    path = (1.0 / s.distance_km) * np.exp(-np.pi * f * s.distance_km / (q * s.beta_km_s))
    gain = 1 + (s.site_gain - 1) * f ** 2 / (f ** 2 + s.site_gain_hz ** 2)
    site = gain * np.exp(-np.pi * s.kappa_s * f)
    return source * path * site / 100.0  # cm/s -> m/s


def _saragoni_hart(t, tw: float, eps: float, eta: float) -> np.ndarray:
    b = -eps * np.log(eta) / (1 + eps * (np.log(eps) - 1))
    c = b / eps
    a = (np.e / eps) ** b
    x = np.clip(t / tw, 0.0, None)
    with np.errstate(divide="ignore"):
        return np.where(x > 0, a * x ** b * np.exp(-c * x), 0.0)


def stochastic_acceleration(rng: np.random.Generator, *, dt: float = 0.005,
                            duration: float = 40.0, onset: float = 3.0,
                            scenario: StochasticScenario = DEMO_SCENARIO) -> np.ndarray:
    """One horizontal component of stochastic ground acceleration [m/s²], shape (n,).

    Parameters
    ----------
    rng : numpy.random.Generator
        Source of the white noise (seed it for a reproducible record).
    dt, duration, onset : float
        Time step, record length and start of the shaking window [s].
    scenario : StochasticScenario
        Source, path and site parameters.
    """
    n = int(round(duration / dt)) + 1
    t = np.arange(n) * dt
    tw = scenario.window_factor * scenario.duration_s
    window = _saragoni_hart(t - onset, tw, scenario.window_eps, scenario.window_eta)
    noise = rng.standard_normal(n) * window
    spec = np.fft.rfft(noise) * dt
    freq = np.fft.rfftfreq(n, dt)
    spec /= np.sqrt(np.mean(np.abs(spec[1:]) ** 2))  # unit mean-square amplitude
    spec *= target_fourier_amplitude(freq, scenario)
    return np.fft.irfft(spec, n) / dt


# Components: (name, channel code, vertical-to-horizontal scale, invented zero offset m/s²).
_COMPONENTS = (("h1", "HN1", 1.0, 0.004), ("h2", "HN2", 1.0, -0.003), ("up", "HNZ", 0.6, 0.002))


def demo_records(*, seed: int = DEMO_SEED, dt: float = 0.005, duration: float = 40.0) -> list[Record]:
    """The three invented demo components h1, h2, up as Records [m/s²].

    Each has its own noise stream; the vertical is scaled by 0.6, and each gets a
    small constant offset (invented, like an instrument's zero error) so that the
    correction has something to remove.
    """
    streams = np.random.SeedSequence(seed).spawn(len(_COMPONENTS))
    out = []
    for (name, channel, scale, offset), ss in zip(_COMPONENTS, streams):
        acc = scale * stochastic_acceleration(np.random.default_rng(ss), dt=dt,
                                              duration=duration) + offset
        out.append(Record(acc=acc, dt=dt, name=f"demo-{name}", component=channel,
                          units="m/s2",
                          metadata={"network": "XX", "station": "DEMO", "location": "",
                                    "synthetic": "invented scenario, Boore (2003) method",
                                    "seed": seed}))
    return out


def make_demo_records(out_dir) -> list[Path]:
    """Write ``demo-h1``, ``demo-h2``, ``demo-up`` as ``.mseed`` and ``.csv`` into ``out_dir``.

    Returns the six paths written (atomically), MiniSEED first.
    """
    out = Path(out_dir)
    out.mkdir(parents=True, exist_ok=True)
    recs = demo_records()
    paths = [write_record(r, out / f"{r.name}.mseed") for r in recs]
    paths += [write_record(r, out / f"{r.name}.csv") for r in recs]
    return paths


def _main(argv: list[str] | None = None) -> int:
    p = argparse.ArgumentParser(prog="python -m groundshake.records.synthetic",
                                description="Write the invented synthetic demo records.")
    p.add_argument("out_dir", help="folder to write demo-h1/h2/up .mseed and .csv into")
    args = p.parse_args(argv)
    for path in make_demo_records(args.out_dir):
        print(path)
    return 0


if __name__ == "__main__":  # pragma: no cover
    sys.exit(_main())
