"""Photon beams and what one photon does: photoionization cross sections, inner-shell
vacancy relaxation, photon beams (charge build-up photon by photon), one-photon thresholds
and selectivity. The classes are the compiled ones; the result classes add tables and
figures."""

from __future__ import annotations

import html
from typing import Any, Union

import numpy as np

from chargecast import _core
from chargecast._util import as_float_array, as_int, require_pandas, require_type, restore
from chargecast.beam_trap import EnergyScan

ElementLike = Union[str, int]

PhotonBeam = _core.PhotonBeam
photon_thresholds = _core.photon_thresholds
photon_selectivity = _core.photon_selectivity


def _charge(charge: Any) -> int:
    return as_int("charge", charge)


# --- cross sections and relaxation ---------------------------------------------------------


def subshell_photoionization_cross_sections_cm2(
    element: ElementLike, charge: int, photon_energies_ev: Any
) -> dict[str, Any]:
    """Photoionization cross section of every occupied subshell of one ion.

    The Verner et al. (1996) subshell fits where the ion has them; otherwise the neutral
    atom's measured total (Elam et al. 2002 above 200 eV, Henke et al. 1993 below 100 eV,
    blended between), shared among subshells by edge jump ratios and scaled hydrogenically
    to the ion's binding energies, blended toward the hydrogenic result by the fraction
    q/(Z−1) of the other electrons removed; where no table reaches, the hydrogenic model
    (exact Stobbe 1s, Kramers for n ≥ 2).

    Parameters
    ----------
    element : str or int
        Symbol, name or Z.
    charge : int
        Charge state of the ion, 0 … Z−1.
    photon_energies_ev : float or array_like
        Photon energies (eV), > 0.

    Returns
    -------
    dict of str to float or ndarray
        ``{subshell label: cross section (cm²)}``, each with the shape of
        ``photon_energies_ev``; zero below the subshell's binding energy.

    Examples
    --------
    >>> s = subshell_photoionization_cross_sections_cm2("Ar", 0, 4000.0)
    >>> list(s)
    ['1s', '2s', '2p', '3s', '3p']
    >>> s["1s"] > s["2p"]
    True
    """
    e, shape = as_float_array("photon_energies_ev", photon_energies_ev)
    labels, sigma = _core._photoionization_subshells(element, _charge(charge), e)
    return {label: restore(sigma[:, j], shape) for j, label in enumerate(labels)}


def photoionization_cross_section_cm2(element: ElementLike, charge: int, photon_energies_ev: Any) -> Any:
    """Total photoionization cross section of one ion (sum over its subshells).

    Parameters
    ----------
    element : str or int
        Symbol, name or Z.
    charge : int
        Charge state, 0 … Z−1.
    photon_energies_ev : float or array_like
        Photon energies (eV), > 0.

    Returns
    -------
    float or ndarray
        Cross section (cm²), same shape as ``photon_energies_ev``.

    Examples
    --------
    >>> round(photoionization_cross_section_cm2("H", 0, 13.6057) / 1e-18, 2)
    6.3
    """
    e, shape = as_float_array("photon_energies_ev", photon_energies_ev)
    return restore(_core._photoionization_total(element, _charge(charge), e), shape)


def vacancy_relaxation(
    element: ElementLike,
    charge: int,
    subshell: str,
    *,
    energy_ev: float | None = None,
    multi_electron: bool = True,
) -> np.ndarray:
    """Probability of k = 0, 1, 2 … extra electrons after a vacancy in one subshell.

    One electron is removed from ``subshell`` of the ion of charge ``charge`` (by a photon or
    an electron); the hole then cascades outward by fluorescence, Coster–Kronig and Auger
    decays (neutral-atom yields of Krause & Oliver 1979 via xraydb), with energy conserved at
    every step. With ``multi_electron`` the making of an inner hole can shake off an
    outer-shell electron (2 % per electron) and the primary hole's Auger decays eject a
    third electron in 8 % of cases (double Auger), calibrated to the published Ne K-hole and
    Xe 4d-hole charge spectra. The final charge is ``charge + 1 + k``.

    Parameters
    ----------
    element : str or int
        Symbol, name or Z.
    charge : int
        Charge of the ion before the vacancy is made.
    subshell : str
        An occupied subshell such as ``"1s"`` or ``"2p"``.
    energy_ev : float, optional
        Energy of the photon or electron that makes the hole (eV); shake-off needs the energy
        of the two-hole state. None: far above threshold (the sudden limit).
    multi_electron : bool, optional
        Include shake-off and double Auger decay (default True).

    Returns
    -------
    ndarray
        P(k) for k = 0, 1, …; sums to 1.

    Examples
    --------
    >>> p = vacancy_relaxation("Ar", 0, "1s")
    >>> round(float(p.sum()), 12)
    1.0
    >>> round(float(np.dot(np.arange(1, p.size + 1), p)), 1)  # mean charge after an argon K hole
    4.3
    """
    require_type("multi_electron", multi_electron, (bool, np.bool_), "True or False")
    return _core._vacancy_relaxation(element, _charge(charge), str(subshell), energy_ev, bool(multi_electron))


# --- one-photon thresholds and selectivity --------------------------------------------------


# --- one-photon thresholds and selectivity --------------------------------------------------


class PhotonThresholds(_core.PhotonThresholds):
    """Charge states one photon can make from the neutral atom, and how.

    Made by :func:`photon_thresholds`: ``element``, ``photon_energy_ev``, ``charges``,
    ``threshold_ev``, ``yield_per_photon``, ``routes`` (per charge, ThresholdRoute objects
    with ``subshell``, ``binding_ev``, ``probability``), ``rows`` and ``max_charge``.
    """

    __slots__ = ()

    def to_pandas(self) -> Any:
        """One row per reachable charge: threshold and routes.

        Returns
        -------
        pandas.DataFrame
            Columns ``threshold_ev``, ``yield_per_photon`` and ``via_subshells`` (e.g.
            ``"1s (0.42), 2s (0.07)"``: subshell and probability of ending here after a hole
            in it); index ``charge``.
        """
        pd = require_pandas()
        return pd.DataFrame(
            {
                "threshold_ev": self.threshold_ev,
                "yield_per_photon": self.yield_per_photon,
                "via_subshells": [
                    ", ".join(f"{r.subshell} ({r.probability:.3g})" for r in routes) for routes in self.routes
                ],
            },
            index=pd.Index(self.charges, name="charge"),
        )

    def _repr_html_(self) -> str:
        rows = "".join(
            f"<tr><td>{q}+</td><td>{t:.2f}</td><td>{y:.3g}</td>"
            f"<td>{html.escape(', '.join(f'{x.subshell} ({x.probability:.3g})' for x in r))}</td></tr>"
            for q, t, y, r in zip(self.charges, self.threshold_ev, self.yield_per_photon, self.routes)
        )
        head = html.escape(f"{self.element}: one photon of {self.photon_energy_ev:g} eV")
        return (
            f"<b>{head}</b><table><tr><th>charge</th><th>Σ IE (eV)</th><th>yield per photon</th>"
            f"<th>via subshell (probability)</th></tr>{rows}</table>"
        )

    def __repr__(self) -> str:
        return (
            f"PhotonThresholds({self.element!r}, photon_energy_ev={self.photon_energy_ev:g}, "
            f"max_charge={self.max_charge})"
        )


class PhotonSelectivity(_core.PhotonSelectivity):
    """Which elements one photon energy ionizes (selectivity of a VUV source).

    Made by :func:`photon_selectivity`: ``photon_energy_ev``, ``symbols``,
    ``first_ionization_ev``, ``ionizes``, ``max_charge``, ``cross_section_cm2``,
    ``ionized``, ``not_ionized`` and ``rows``.
    """

    __slots__ = ()

    def to_pandas(self) -> Any:
        """One row per element.

        Returns
        -------
        pandas.DataFrame
            Columns ``first_ionization_ev``, ``ionizes``, ``max_charge``,
            ``cross_section_cm2``; index ``element``.
        """
        pd = require_pandas()
        return pd.DataFrame(
            {
                "first_ionization_ev": self.first_ionization_ev,
                "ionizes": self.ionizes,
                "max_charge": self.max_charge,
                "cross_section_cm2": self.cross_section_cm2,
            },
            index=pd.Index(self.symbols, name="element"),
        )

    def _repr_html_(self) -> str:
        rows = "".join(
            f"<tr><td>{s}</td><td>{ie:.3f}</td><td>{'yes' if i else 'no'}</td><td>{q}</td></tr>"
            for s, ie, i, q in zip(self.symbols, self.first_ionization_ev, self.ionizes, self.max_charge)
        )
        return (
            f"<b>photon energy {self.photon_energy_ev:g} eV</b><table><tr><th>element</th>"
            f"<th>first IE (eV)</th><th>ionized</th><th>max charge</th></tr>{rows}</table>"
        )

    def __repr__(self) -> str:
        return (
            f"PhotonSelectivity({self.photon_energy_ev:g} eV: ionized {self.ionized}, not {self.not_ionized})"
        )


# --- photon beam ----------------------------------------------------------------------------


class PhotonEnergyScan(EnergyScan):
    """Fraction of target charge state(s) over a photon-energy × time grid, and its maximum.

    Made by ``PhotonBeam.best_energy``; the same fields as :class:`EnergyScan`.
    """

    __slots__ = ()

    def plot(self, ax: Any | None = None) -> Any:
        """Photon-energy × time map of the target fraction, best point marked.

        Returns
        -------
        matplotlib Axes
        """
        ax = super().plot(ax)
        ax.set_ylabel("photon energy (eV)")
        ax.set_xlabel("exposure time (s)")
        return ax

    def __repr__(self) -> str:
        return "Photon" + super().__repr__()


_core._register_result("PhotonThresholds", PhotonThresholds)
_core._register_result("PhotonSelectivity", PhotonSelectivity)
_core._register_result("PhotonEnergyScan", PhotonEnergyScan)
