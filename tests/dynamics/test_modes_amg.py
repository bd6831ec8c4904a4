"""The factorization-free eigen-solver (LOBPCG + algebraic multigrid) against ARPACK.

Reference: scipy.sparse.linalg.eigsh (ARPACK, shift-invert Lanczos) on the same matrices,
an independent solver of the same generalized eigenproblem K φ = λ M φ; frequencies
must agree to 1e-6 relative and the shapes span the same space (MAC ≈ 1, the modal
assurance criterion of Allemang & Brown 1982).
"""
from __future__ import annotations

import numpy as np
import pytest

from _blocks import concrete_block
from groundshake.dynamics import compute_modes
from groundshake.model import build_model
from groundshake.scenario import parse_scenario_text

pytest.importorskip("pyamg")


def test_amg_lobpcg_matches_arpack():
    text = 'title = "amg test (invented)"\n' + concrete_block((4.0, 2.0, 1.5), element_size=0.5)
    model = build_model(parse_scenario_text(text, source="amg.toml"))
    ref = compute_modes(model, n_modes=8, method="lanczos", warn=False)
    amg = compute_modes(model, n_modes=8, method="amg", warn=False)
    np.testing.assert_allclose(amg.frequency, ref.frequency, rtol=1e-6)  # ARPACK reference
    M = model.M
    for j in range(3):    # well-separated lowest modes: MAC = 1 (Allemang & Brown 1982)
        a, b = amg.shapes[:, j], ref.shapes[:, j]
        mac = (a @ (M @ b)) ** 2 / ((a @ (M @ a)) * (b @ (M @ b)))
        assert mac == pytest.approx(1.0, abs=1e-6)
