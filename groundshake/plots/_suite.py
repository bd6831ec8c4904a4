"""Figures over a suite of record sets."""
from __future__ import annotations

from typing import TYPE_CHECKING, Sequence

from ._spectra import Curve, spectra_figure

if TYPE_CHECKING:  # pragma: no cover
    from matplotlib.figure import Figure

__all__ = ["suite_spectra_figure"]


def suite_spectra_figure(panels: Sequence[tuple[str, Sequence[Curve]]], *, ylabel: str
                         ) -> "Figure":
    """Spectra over the suite (e.g. each set's curve, the median and the 16-84 % curves),
    one panel per point or component, three to a row, one legend under the panels.

    ``panels`` as for :func:`~groundshake.plots.spectra_figure`; values in the unit
    ``ylabel`` names.
    """
    return spectra_figure(panels, columns=3, ylabel=ylabel, shared_legend=True)
