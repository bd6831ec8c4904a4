"""Damping of the block model: Rayleigh coefficients, the damping matrix for direct
integration, composite modal ratios and the coupled modal damping matrix.

These read the damping data a :class:`~groundshake.model.BlockModel` carries (its ratio,
``rayleigh_hz``, the stiffness parts of equipment supports and the discrete and
radiation dashpots) and return what they compute; the Rayleigh frequencies used and why
come back as a :class:`RayleighChoice` for the summary. SI units: damping matrices in
N·s/m, frequencies in Hz, ratios as ratios.
"""
from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import scipy.sparse as sp

from .._errors import InputError

__all__ = ["MODAL_DAMPING_CAP", "RayleighChoice", "governing_frequencies",
           "rayleigh_coefficients", "damping_matrix", "modal_damping", "modal_damping_matrix"]

#: Upper limit of composite modal damping ratios (ASCE 4 practice, from memory: 20 %).
MODAL_DAMPING_CAP = 0.20


@dataclass(frozen=True)
class RayleighChoice:
    """Rayleigh damping C = a0·M_block + a1·K_block: ``a0`` [1/s], ``a1`` [s], the anchor
    ``frequencies_hz`` (f1, f2) [Hz] where the ratio is the block's, and ``why`` they were
    chosen (text for the summary)."""

    a0: float
    a1: float
    frequencies_hz: tuple[float, float]
    why: str


def _governing(model, modes) -> tuple[float, float, str]:
    if modes is None:
        raise InputError("the Rayleigh anchor frequencies come from the block's modes: "
                         "give modes (compute_modes(model)) or rayleigh_hz")
    phi = np.asarray(modes.shapes)
    f = np.asarray(modes.frequency, float)
    share = np.einsum("im,im->m", phi, model.block_mass_matrix() @ phi)
    ratio = np.asarray(modes.effective_mass_ratio).max(axis=1)
    own = share >= 0.5
    gov = own & (ratio >= 0.05)
    if gov.any():
        sel = f[gov]
        why = "block modes holding ≥ 5 % of the mass"
    elif own.any():
        sel = f[own][[int(np.argmax(np.where(own, ratio, -1)[own]))]]
        why = "the block mode of largest effective mass"
    else:
        sel = f[:1]
        why = "the first mode (no mode is mostly the block's)"
    f1, f2 = float(sel.min()), float(sel.max())
    return f1, max(f2, 1.5 * f1), why


def governing_frequencies(model, modes) -> tuple[float, float]:
    """Rayleigh anchor frequencies [Hz] from the block's governing modes.

    A mode belongs to the block when at least half of its kinetic energy
    (φᵀ M_block φ, φᵀMφ = 1) is in the block; among those, the governing modes hold
    at least 5 % of the total mass in some direction (effective mass Γ²/m). The
    anchors are the lowest and highest governing frequencies, spread to at least
    f2 = 1.5·f1. Without such a mode: the block mode of largest effective mass, else
    the first mode. ``modes`` (a :class:`~groundshake.dynamics.Modes`; the 12 lowest
    are enough) is required.
    """
    f1, f2, _ = _governing(model, modes)
    return f1, f2


def rayleigh_coefficients(model, frequencies_hz=None, *, modes=None) -> RayleighChoice:
    """Rayleigh damping C = a0·M_block + a1·K_block giving the block's ratio at two
    frequencies.

    Uses ``frequencies_hz`` [Hz], else the scenario's ``rayleigh_hz``, else the
    block's governing modes (:func:`governing_frequencies`). Chopra §11.4:
    a0 = 2ξω1ω2/(ω1+ω2), a1 = 2ξ/(ω1+ω2).

    Returns
    -------
    RayleighChoice
        ``a0`` [1/s], ``a1`` [s], the ``frequencies_hz`` used and ``why``.
    """
    if frequencies_hz is not None:
        f, why = frequencies_hz, "frequencies given"
    elif model.rayleigh_hz is not None:
        f, why = model.rayleigh_hz, "rayleigh_hz of the scenario"
    else:
        *f, why = _governing(model, modes)
    w1, w2 = 2 * np.pi * f[0], 2 * np.pi * f[1]
    z = model.damping_ratio
    return RayleighChoice(a0=2 * z * w1 * w2 / (w1 + w2), a1=2 * z / (w1 + w2),
                          frequencies_hz=(float(f[0]), float(f[1])), why=why)


def damping_matrix(model, frequencies_hz=None, *, modes=None,
                   rayleigh: RayleighChoice | None = None) -> sp.csr_matrix:
    """Damping (n, n) [N·s/m] for direct integration.

    C = a·M_block + b·K_block + C_equipment + C_radiation: Rayleigh damping from the
    block's own mass and stiffness (equipment on flexible supports left out of both;
    soil springs inside K_block, so the soil's material damping is the block ratio at
    the anchors), each equipment support's dashpot at its own ratio, and the soil's
    radiation dashpots. Dashpots acting on the averaged base motion of a distributed
    bed are not in this matrix: see ``BlockModel.damping_update``. ``rayleigh`` (from
    :func:`rayleigh_coefficients`, which the caller keeps for its summary) replaces
    ``frequencies_hz`` and ``modes``.
    """
    if rayleigh is None:
        rayleigh = rayleigh_coefficients(model, frequencies_hz, modes=modes)
    C = rayleigh.a0 * model.block_mass_matrix() + rayleigh.a1 * model._block_stiffness()
    if model._dashpots is not None:
        C = C + model._dashpots
    return sp.csr_matrix(C)


def _block_ratio(model, phi: np.ndarray):
    """Per mode of ``phi`` (n, m): strain energy φᵀKφ, modal mass φᵀMφ, ω [rad/s] and the
    block's ratio at ω (its Rayleigh value a/(2ω) + bω/2 when ``rayleigh_hz`` is given,
    Chopra §11.4), each shaped (m,)."""
    e_tot = np.einsum("im,im->m", phi, model.K @ phi)
    mm = np.einsum("im,im->m", phi, model.M @ phi)
    omega = np.sqrt(np.maximum(e_tot, 0.0) / mm)
    if model.rayleigh_hz is not None:
        r = rayleigh_coefficients(model, model.rayleigh_hz)
        a, b = r.a0, r.a1
        with np.errstate(divide="ignore", invalid="ignore"):
            zb = np.where(omega > 0, a / (2 * omega) + b * omega / 2, model.damping_ratio)
    else:
        zb = np.full(phi.shape[1], model.damping_ratio)
    return e_tot, mm, omega, zb


def modal_damping(model, shapes: np.ndarray) -> np.ndarray:
    """Composite modal damping ratios (m,) for mode shapes (n, m).

    ξ_n = Σ_j ξ_j·φᵀK_jφ / φᵀKφ (strain-energy weights: block and soil springs at the
    block ratio or its Rayleigh value, each equipment support at its own ratio), plus
    φᵀC_radφ / (2ω_n φᵀMφ) for soil radiation dashpots (their diagonal modal term,
    low-rank bed dashpots included),
    limited to :data:`MODAL_DAMPING_CAP` (20 %, ASCE 4 practice, from memory).
    """
    phi = np.asarray(shapes, dtype=float)
    if phi.ndim == 1:
        phi = phi[:, None]
    e_tot, mm, omega, zb = _block_ratio(model, phi)
    e_rest = e_tot.copy()
    num = np.zeros(phi.shape[1])
    for ratio, Kp in model._stiff_parts:
        if ratio is None:
            continue
        e = np.einsum("im,im->m", phi, Kp @ phi)
        num += ratio * e
        e_rest -= e
    with np.errstate(divide="ignore", invalid="ignore"):
        z = np.where(e_tot > 0, (zb * e_rest + num) / e_tot, zb)
        if model._radiation is not None and model._radiation.nnz:
            cr = np.einsum("im,im->m", phi, model._radiation @ phi)
            z = z + np.where(omega > 0, cr / (2 * omega * mm), 0.0)
        if model._radiation_lowrank is not None:
            U, d = model._radiation_lowrank
            cr = np.einsum("rm,r->m", np.asarray(U.T @ phi) ** 2, np.asarray(d))
            z = z + np.where(omega > 0, cr / (2 * omega * mm), 0.0)
    return np.minimum(z, MODAL_DAMPING_CAP)


def modal_damping_matrix(model, shapes: np.ndarray) -> np.ndarray:
    """Modal damping matrix (m, m) [1/s] for mass-normalised shapes (n, m).

    Cm = diag(2ωₙ·ξ_b·sₙ) + Φᵀ C_d Φ: the block and the soil springs damped at the
    block ratio ξ_b (or its Rayleigh value at ωₙ when ``rayleigh_hz`` is given) in
    proportion sₙ of the mode's strain energy outside the equipment supports (classical,
    diagonal), plus the discrete dashpots C_d (equipment supports at their own ratios,
    soil radiation) projected whole, so the modes stay coupled through them as in the
    direct method. No cap is applied.
    """
    phi = np.asarray(shapes, dtype=float)
    e_tot, _, omega, zb = _block_ratio(model, phi)
    e_eq = np.zeros(phi.shape[1])
    for ratio, Kp in model._stiff_parts:
        if ratio is not None:
            e_eq += np.einsum("im,im->m", phi, Kp @ phi)
    with np.errstate(divide="ignore", invalid="ignore"):
        share = np.where(e_tot > 0, (e_tot - e_eq) / e_tot, 1.0)
    Cm = np.diag(2 * omega * zb * share)
    if model._dashpots is not None and model._dashpots.nnz:
        Cm = Cm + phi.T @ (model._dashpots @ phi)
    if model._radiation_lowrank is not None:
        U, d = model._radiation_lowrank
        W = np.asarray(U.T @ phi)
        Cm = Cm + W.T @ (np.asarray(d)[:, None] * W)
    return 0.5 * (Cm + Cm.T)
