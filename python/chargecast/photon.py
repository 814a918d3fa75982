"""Photon-driven and single-collision electron-impact sources: photoionization cross
sections, inner-shell vacancy relaxation, photon beams (charge build-up photon by photon),
one-photon thresholds and selectivity, and the charge yields and appearance curves of a
single-collision electron source."""

from __future__ import annotations

import html
from collections.abc import Sequence
from typing import Any, Union

import numpy as np

from chargecast import _core
from chargecast._core import InvalidParameterError
from chargecast._util import (
    PALETTE,
    as_charges,
    as_float,
    as_float_array,
    as_int,
    as_times,
    element_symbol,
    inline_png,
    require_pandas,
    require_pyplot,
    restore,
)
from chargecast.evolution import Evolution
from chargecast.trap import EnergyScan

ElementLike = Union[str, int]


def _times(times_s: Any) -> np.ndarray:
    return as_times("times_s", times_s)


def _charge(charge: Any) -> int:
    return as_int("charge", charge)


# --- cross sections and relaxation ---------------------------------------------------------


def subshell_photoionization_cross_sections_cm2(
    element: ElementLike, charge: int, photon_energy_ev: Any
) -> dict[str, Any]:
    """Photoionization cross section of every occupied subshell of one ion.

    Above 100 eV (after scaling to the ion) the neutral atom's Elam photoabsorption, shared
    among subshells by edge jump ratios and scaled hydrogenically to the ion's binding
    energies, blended toward the hydrogenic result by the fraction q/(Z−1) of the other
    electrons removed; below that the hydrogenic model (exact Stobbe 1s, Kramers for n ≥ 2).

    Parameters
    ----------
    element : str or int
        Symbol, name or Z.
    charge : int
        Charge state of the ion, 0 … Z−1.
    photon_energy_ev : float or array_like
        Photon energies (eV), > 0.

    Returns
    -------
    dict of str to float or ndarray
        ``{subshell label: cross section (cm²)}``, each with the shape of
        ``photon_energy_ev``; zero below the subshell's binding energy.

    Examples
    --------
    >>> s = subshell_photoionization_cross_sections_cm2("Ar", 0, 4000.0)
    >>> list(s)
    ['1s', '2s', '2p', '3s', '3p']
    >>> s["1s"] > s["2p"]
    True
    """
    e, shape = as_float_array("photon_energy_ev", photon_energy_ev)
    labels, _, _, sigma = _core._photoionization_subshells(element, _charge(charge), e)
    return {label: restore(sigma[:, j], shape) for j, label in enumerate(labels)}


def photoionization_cross_section_cm2(element: ElementLike, charge: int, photon_energy_ev: Any) -> Any:
    """Total photoionization cross section of one ion (sum over its subshells).

    Parameters
    ----------
    element : str or int
        Symbol, name or Z.
    charge : int
        Charge state, 0 … Z−1.
    photon_energy_ev : float or array_like
        Photon energies (eV), > 0.

    Returns
    -------
    float or ndarray
        Cross section (cm²), same shape as ``photon_energy_ev``.

    Examples
    --------
    >>> round(photoionization_cross_section_cm2("H", 0, 13.6057) / 1e-18, 2)
    6.3
    """
    e, shape = as_float_array("photon_energy_ev", photon_energy_ev)
    _, _, _, sigma = _core._photoionization_subshells(element, _charge(charge), e)
    return restore(sigma.sum(axis=1), shape)


def vacancy_relaxation(element: ElementLike, charge: int, subshell: str) -> np.ndarray:
    """Probability of k = 0, 1, 2 … extra electrons after a vacancy in one subshell.

    One electron is removed from ``subshell`` of the ion of charge ``charge`` (by a photon or
    an electron); the hole then cascades outward by fluorescence, Coster–Kronig and Auger
    decays (neutral-atom yields of Krause & Oliver 1979 via xraydb), with energy conserved at
    every step. The final charge is ``charge + 1 + k``.

    Parameters
    ----------
    element : str or int
        Symbol, name or Z.
    charge : int
        Charge of the ion before the vacancy is made.
    subshell : str
        An occupied subshell such as ``"1s"`` or ``"2p"``.

    Returns
    -------
    ndarray
        P(k) for k = 0, 1, …; sums to 1.

    Examples
    --------
    >>> p = vacancy_relaxation("Ar", 0, "1s")
    >>> round(float(p.sum()), 12)
    1.0
    >>> int(np.argmax(p)) + 1     # most probable final charge after a K hole in argon
    4
    """
    p, _ = _core._vacancy_relaxation(element, _charge(charge), str(subshell))
    return p


# --- one-photon thresholds and selectivity --------------------------------------------------


class PhotonThresholds:
    """Charge states one photon can make from the neutral atom, and how.

    Attributes
    ----------
    element : str
    photon_energy_ev : float
    charges : ndarray of int
        Reachable charge states (Σ IE ≤ hν).
    threshold_ev : ndarray
        Σ of the ionization energies below each charge (eV).
    yield_per_photon : ndarray
        Fraction of the photons absorbed by the neutral atom that end at each charge
        (photoionization of each subshell weighted by its cross section, then relaxation).
    routes : list of list of tuple
        Per charge: ``(subshell, binding_ev, probability)`` for every subshell whose
        photoionization followed by relaxation ends at that charge, with the probability of
        ending there once that subshell has lost an electron. A charge without routes is open
        only to direct multiple photoionization (shake-off), which the rate model leaves out.
    """

    def __init__(
        self, element: str, photon_energy_ev: float, rows: list[tuple[int, float, float, list]]
    ) -> None:
        self.element = element
        self.photon_energy_ev = photon_energy_ev
        self.charges = np.array([r[0] for r in rows], dtype=int)
        self.threshold_ev = np.array([r[1] for r in rows], dtype=float)
        self.yield_per_photon = np.array([r[2] for r in rows], dtype=float)
        self.routes = [list(r[3]) for r in rows]

    @property
    def max_charge(self) -> int:
        """Highest charge one photon can make (0 if the photon does not ionize)."""
        return int(self.charges.max()) if self.charges.size else 0

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
                "via_subshells": [", ".join(f"{s} ({p:.3g})" for s, _, p in r) for r in self.routes],
            },
            index=pd.Index(self.charges, name="charge"),
        )

    def _repr_html_(self) -> str:
        rows = "".join(
            f"<tr><td>{q}+</td><td>{t:.2f}</td><td>{y:.3g}</td>"
            f"<td>{html.escape(', '.join(f'{s} ({p:.3g})' for s, _, p in r))}</td></tr>"
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


def photon_thresholds(element: ElementLike, photon_energy_ev: float) -> PhotonThresholds:
    """Charge states one photon can make from the neutral atom, and by which route.

    A charge q is reachable when the sum of the first q ionization energies does not exceed
    the photon energy (direct multiple photoionization is then energetically open). Inner
    subshells bound by less than hν add routes: photoionization followed by relaxation.
    For several elements at once see :func:`photon_selectivity`.

    Parameters
    ----------
    element : str or int
        Symbol, name or Z.
    photon_energy_ev : float
        Photon energy (eV), > 0.

    Returns
    -------
    PhotonThresholds

    Examples
    --------
    >>> th = photon_thresholds("Ar", photon_energy_ev=3300.0)
    >>> th.max_charge
    12
    >>> th.charges[:3].tolist(), float(th.threshold_ev[0])
    ([1, 2, 3], 15.7596...)
    >>> [s for s, _, _ in th.routes[3]]       # Ar4+ needs a K hole
    ['1s']
    >>> round(float(th.yield_per_photon.sum()), 9)
    1.0
    """
    e = as_float("photon_energy_ev", photon_energy_ev)
    return PhotonThresholds(element_symbol(element), e, _core._photon_thresholds(element, e))


class PhotonSelectivity:
    """Which elements one photon energy ionizes (selectivity of a VUV source).

    Attributes
    ----------
    photon_energy_ev : float
    symbols : list of str
    first_ionization_ev : ndarray
    ionizes : ndarray of bool
    max_charge : ndarray of int
        Highest charge one photon can make.
    cross_section_cm2 : ndarray
        Photoionization cross section of the neutral atom at hν (cm²), hydrogenic model
        below 100 eV (a factor-of-several estimate).
    """

    def __init__(self, photon_energy_ev: float, rows: list[tuple[str, float, bool, int, float]]) -> None:
        self.photon_energy_ev = photon_energy_ev
        self.symbols = [r[0] for r in rows]
        self.first_ionization_ev = np.array([r[1] for r in rows], dtype=float)
        self.ionizes = np.array([r[2] for r in rows], dtype=bool)
        self.max_charge = np.array([r[3] for r in rows], dtype=int)
        self.cross_section_cm2 = np.array([r[4] for r in rows], dtype=float)

    @property
    def ionized(self) -> list[str]:
        """Symbols of the elements the photon ionizes."""
        return [s for s, i in zip(self.symbols, self.ionizes) if i]

    @property
    def not_ionized(self) -> list[str]:
        """Symbols of the elements the photon leaves neutral."""
        return [s for s, i in zip(self.symbols, self.ionizes) if not i]

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


def photon_selectivity(elements: Sequence[ElementLike], photon_energy_ev: float) -> PhotonSelectivity:
    """For several elements, whether one photon of the given energy ionizes them.

    Parameters
    ----------
    elements : sequence of str or int
        Symbols, names or atomic numbers.
    photon_energy_ev : float
        Photon energy (eV), > 0.

    Returns
    -------
    PhotonSelectivity

    Examples
    --------
    >>> sel = photon_selectivity(["Kr", "Ar", "N", "Xe"], photon_energy_ev=14.6)
    >>> sel.ionized, sel.not_ionized
    (['Kr', 'N', 'Xe'], ['Ar'])
    """
    if isinstance(elements, (str, int)):
        elements = [elements]
    return PhotonSelectivity(
        as_float("photon_energy_ev", photon_energy_ev),
        _core._photon_selectivity(list(elements), as_float("photon_energy_ev", photon_energy_ev)),
    )


# --- photon beam ----------------------------------------------------------------------------


class PhotonEnergyScan(EnergyScan):
    """Fraction of target charge state(s) over a photon-energy × time grid, and its maximum."""

    def plot(self, ax: Any | None = None) -> Any:
        """Photon-energy × time map of the target fraction, best point marked.

        Returns
        -------
        matplotlib Axes
        """
        ax = super().plot(ax)
        ax.set_ylabel("photon energy (eV)")
        return ax

    def __repr__(self) -> str:
        return "Photon" + super().__repr__()


class PhotonBeam:
    """A photon beam: photon energy, flux and bandwidth.

    Every ion absorbs photons at the rate Φ·σ_s(hν) per subshell s; inner-shell holes relax
    and add charges, so the beam drives jumps q → q+1+k and the charge state builds up photon
    after photon under high flux. Direct multiple photoionization (shake-off, a few per cent)
    and non-linear absorption are not included.

    Parameters
    ----------
    photon_energy_ev : float
        Photon energy (eV), > 0.
    flux_cm2_s : float
        Photon flux (photons cm⁻² s⁻¹), ≥ 0.
    bandwidth_ev : float, optional
        Full width at half maximum of a Gaussian spectrum (eV), ≥ 0; 0 = monochromatic.

    Examples
    --------
    >>> beam = PhotonBeam(photon_energy_ev=1500.0, flux_cm2_s=1e22)
    >>> evo = beam.evolve("Ne", times_s=np.geomspace(1e-8, 1e-4, 30))
    >>> evo.fractions.shape
    (30, 11)
    >>> int(np.argmax(beam.steady_state("Ne")))   # Ne9+ 1s binds by 1362 eV, Ne10+ is bare
    10
    >>> bool(beam.rates("Ne")[0, 1] > 0)
    True
    """

    def __init__(self, photon_energy_ev: float, flux_cm2_s: float, bandwidth_ev: float = 0.0) -> None:
        self.photon_energy_ev = as_float("photon_energy_ev", photon_energy_ev)
        self.flux_cm2_s = as_float("flux_cm2_s", flux_cm2_s)
        self.bandwidth_ev = as_float("bandwidth_ev", bandwidth_ev)
        _core._photon_beam_check(self.photon_energy_ev, self.flux_cm2_s, self.bandwidth_ev)

    def _args(self) -> tuple[float, float, float]:
        return self.photon_energy_ev, self.flux_cm2_s, self.bandwidth_ev

    def _label(self) -> str:
        bw = f" ± {self.bandwidth_ev:g} eV" if self.bandwidth_ev > 0 else ""
        return f"{self.photon_energy_ev:g} eV{bw} photons, {self.flux_cm2_s:.3g} cm⁻² s⁻¹"

    def rates(self, element: ElementLike) -> np.ndarray:
        """The element's jump-rate matrix ``rates[from, to]`` (s⁻¹) under this beam.

        Parameters
        ----------
        element : str or int
            Symbol, name or Z.

        Returns
        -------
        ndarray, shape (Z+1, Z+1)
            Rates of q → q+1+k from photoionization of each subshell followed by relaxation.
        """
        return _core._photon_rates(element, *self._args())

    def evolve(self, element: ElementLike, times_s: Any, initial_charge: int = 0) -> Evolution:
        """Charge-state fractions over exposure time.

        Parameters
        ----------
        element : str or int
            Symbol, name or Z.
        times_s : array_like
            Output times (s), ascending, ≥ 0.
        initial_charge : int
            Charge state of the atoms at t = 0 (0 = neutral).

        Returns
        -------
        Evolution
            ``times_s``, ``charges``, ``fractions`` [T, Z+1], ``peak()``, ``plot()`` …
        """
        t = _times(times_s)
        fr = _core._photon_evolve(element, *self._args(), t, as_int("initial_charge", initial_charge))
        return Evolution(element_symbol(element), t, fr, self._label())

    def steady_state(self, element: ElementLike) -> np.ndarray:
        """Long-time fractions of atoms that start neutral: where the photon ladder ends.

        Photons only raise the charge, so every atom ends in a charge state that no photon of
        this beam can ionize further; branching by relaxation spreads it over several.

        Parameters
        ----------
        element : str or int
            Symbol, name or Z.

        Returns
        -------
        ndarray, shape (Z+1,)
            Fraction of each charge state.
        """
        return _core._photon_steady_state(element, *self._args())

    def best_energy(
        self,
        element: ElementLike,
        charge: int | Sequence[int],
        photon_energies_ev: Any,
        times_s: Any,
    ) -> PhotonEnergyScan:
        """The photon energy and exposure time that maximise one charge state (or a set).

        Parameters
        ----------
        element : str or int
            Symbol, name or Z.
        charge : int or sequence of int
            Target charge state(s); with several, their summed fraction is maximised.
        photon_energies_ev : array_like
            Photon energies (eV) to try; flux and bandwidth held fixed.
        times_s : array_like
            Exposure times (s), ascending.

        Returns
        -------
        PhotonEnergyScan
            ``best_energy_ev``, ``best_time_s``, ``best_fraction`` and ``fraction[energy, time]``.
        """
        charges = as_charges(charge)
        e, _ = as_float_array("photon_energies_ev", photon_energies_ev)
        t = _times(times_s)
        d = _core._photon_energy_time_map(element, charges, self.flux_cm2_s, self.bandwidth_ev, e, t)
        return PhotonEnergyScan(
            element_symbol(element),
            charges,
            e,
            t,
            d["fraction"],
            d["best_energy_ev"],
            d["best_time_s"],
            d["best_fraction"],
        )

    def __repr__(self) -> str:
        return (
            f"PhotonBeam(photon_energy_ev={self.photon_energy_ev:g}, flux_cm2_s={self.flux_cm2_s:g}, "
            f"bandwidth_ev={self.bandwidth_ev:g})"
        )


# --- single-collision electron-impact source ------------------------------------------------


class ChargeYields:
    """Charge states one electron collision makes from the neutral atom.

    Attributes
    ----------
    element : str
    energy_ev, energy_spread_ev : float
    charges : ndarray of int
        1 … highest charge with a non-zero cross section.
    cross_section_cm2 : ndarray
        Partial cross section of each charge (cm²).
    subshell_ionization_cm2 : ndarray
        Part from single ionization of a subshell followed by relaxation (cm²).
    direct_double_cm2 : ndarray
        Part from direct double ionization (cm², charge 2 only).
    yields : ndarray
        Relative yields (sum 1; all 0 below the first ionization energy).
    """

    def __init__(
        self,
        element: str,
        energy_ev: float,
        energy_spread_ev: float,
        subshell: np.ndarray,
        direct: np.ndarray,
    ) -> None:
        total = subshell + direct
        nonzero = np.nonzero(total[1:] > 0)[0]
        top = int(nonzero.max()) + 1 if nonzero.size else 1
        self.element = element
        self.energy_ev = energy_ev
        self.energy_spread_ev = energy_spread_ev
        self.charges = np.arange(1, top + 1)
        self.subshell_ionization_cm2 = subshell[1 : top + 1]
        self.direct_double_cm2 = direct[1 : top + 1]
        self.cross_section_cm2 = total[1 : top + 1]
        s = self.cross_section_cm2.sum()
        self.yields = self.cross_section_cm2 / s if s > 0 else np.zeros_like(self.cross_section_cm2)

    def ratio(self, charge: int, reference: int = 1) -> float:
        """σ(charge)/σ(reference), e.g. ``ratio(2)`` = σ(2+)/σ(1+)."""
        q, r = as_int("charge", charge), as_int("reference", reference)
        for c in (q, r):
            if c < 1:
                raise InvalidParameterError(f"invalid charge {c}: must be >= 1")
        sig = lambda c: float(self.cross_section_cm2[c - 1]) if c <= self.charges[-1] else 0.0  # noqa: E731
        den = sig(r)
        return sig(q) / den if den > 0 else float("nan")

    def to_pandas(self) -> Any:
        """One row per charge.

        Returns
        -------
        pandas.DataFrame
            Columns ``cross_section_cm2``, ``subshell_ionization_cm2``, ``direct_double_cm2``,
            ``yield``; index ``charge``.
        """
        pd = require_pandas()
        return pd.DataFrame(
            {
                "cross_section_cm2": self.cross_section_cm2,
                "subshell_ionization_cm2": self.subshell_ionization_cm2,
                "direct_double_cm2": self.direct_double_cm2,
                "yield": self.yields,
            },
            index=pd.Index(self.charges, name="charge"),
        )

    def plot(self, ax: Any | None = None) -> Any:
        """Bar chart of the relative yields (log scale).

        Returns
        -------
        matplotlib Axes
        """
        plt = require_pyplot()
        if ax is None:
            _, ax = plt.subplots(figsize=(6, 3.5))
        ax.bar(self.charges, np.where(self.yields > 0, self.yields, np.nan), color=PALETTE[0])
        ax.set_yscale("log")
        ax.set_xticks(self.charges)
        ax.set_xticklabels([f"{q}+" for q in self.charges])
        ax.set_xlabel("charge")
        ax.set_ylabel("relative yield")
        spread = f" ± {self.energy_spread_ev:g}" if self.energy_spread_ev > 0 else ""
        ax.set_title(f"{self.element}, one {self.energy_ev:g}{spread} eV electron collision", fontsize=10)
        return ax

    def _repr_html_(self) -> str:
        rows = "".join(
            f"<tr><td>{q}+</td><td>{s:.3e}</td><td>{y:.4f}</td></tr>"
            for q, s, y in zip(self.charges, self.cross_section_cm2, self.yields)
        )
        head = html.escape(f"{self.element}: one collision at {self.energy_ev:g} eV")
        return (
            f"<b>{head}</b><table><tr><th>charge</th><th>σ (cm²)</th><th>yield</th></tr>{rows}</table>"
            + inline_png(self.plot)
        )

    def __repr__(self) -> str:
        ys = ", ".join(f"{q}+: {y:.3g}" for q, y in zip(self.charges, self.yields) if y > 1e-4)
        return f"ChargeYields({self.element!r}, {self.energy_ev:g} eV: {ys})"


class AppearanceCurves:
    """Partial cross sections of each charge against electron energy (one collision).

    Attributes
    ----------
    element : str
    energies_ev : ndarray, shape (E,)
    charges : ndarray of int
        1 … highest charge seen anywhere in the scan.
    cross_section_cm2 : ndarray, shape (E, len(charges))
    energy_spread_ev : float
    """

    def __init__(
        self, element: str, energies_ev: np.ndarray, sigma: np.ndarray, energy_spread_ev: float
    ) -> None:
        seen = np.nonzero((sigma[:, 1:] > 0).any(axis=0))[0]
        top = int(seen.max()) + 1 if seen.size else 1
        self.element = element
        self.energies_ev = energies_ev
        self.energy_spread_ev = energy_spread_ev
        self.charges = np.arange(1, top + 1)
        self.cross_section_cm2 = sigma[:, 1 : top + 1]

    def appearance_energy_ev(self, charge: int) -> float:
        """Lowest scanned energy with a non-zero cross section for ``charge`` (nan if none)."""
        q = as_int("charge", charge)
        if not 1 <= q <= self.charges[-1]:
            return float("nan")
        hit = np.nonzero(self.cross_section_cm2[:, q - 1] > 0)[0]
        return float(self.energies_ev[hit[0]]) if hit.size else float("nan")

    def to_pandas(self) -> Any:
        """Cross sections (cm²): one row per energy (index ``energy_ev``), one column per charge.

        Returns
        -------
        pandas.DataFrame
        """
        pd = require_pandas()
        df = pd.DataFrame(
            self.cross_section_cm2, index=pd.Index(self.energies_ev, name="energy_ev"), columns=self.charges
        )
        df.columns.name = "charge"
        return df

    def plot(self, ax: Any | None = None) -> Any:
        """Partial cross sections against electron energy, log–log.

        Returns
        -------
        matplotlib Axes
        """
        plt = require_pyplot()
        if ax is None:
            _, ax = plt.subplots(figsize=(7, 4.5))
        for k, q in enumerate(self.charges):
            y = self.cross_section_cm2[:, k]
            ax.plot(
                self.energies_ev, np.where(y > 0, y, np.nan), color=PALETTE[k % len(PALETTE)], label=f"{q}+"
            )
        ax.set_xscale("log")
        ax.set_yscale("log")
        ax.set_xlabel("electron energy (eV)")
        ax.set_ylabel("partial cross section (cm²)")
        ax.set_title(f"{self.element} appearance curves (one collision)", fontsize=10)
        if len(self.charges) <= 24:
            ax.legend(
                fontsize=7,
                ncol=max(1, len(self.charges) // 12 + 1),
                loc="center left",
                bbox_to_anchor=(1.0, 0.5),
                frameon=False,
            )
        ax.grid(True, which="major", alpha=0.3)
        return ax

    def _repr_html_(self) -> str:
        head = html.escape(
            f"{self.element} appearance curves, {len(self.energies_ev)} energies "
            f"{self.energies_ev.min():g}–{self.energies_ev.max():g} eV"
        )
        rows = "".join(
            f"<tr><td>{q}+</td><td>{self.appearance_energy_ev(int(q)):.4g}</td></tr>" for q in self.charges
        )
        return (
            f"<b>{head}</b><table><tr><th>charge</th><th>first scanned energy with σ &gt; 0 (eV)</th></tr>"
            f"{rows}</table>" + inline_png(self.plot)
        )

    def __repr__(self) -> str:
        return (
            f"AppearanceCurves({self.element!r}, {len(self.energies_ev)} energies, "
            f"charges 1..{self.charges[-1]})"
        )


def appearance_curves(
    element: ElementLike, energies_ev: Any, energy_spread_ev: float = 0.0
) -> AppearanceCurves:
    """Energy scan of a single-collision electron source: partial cross section per charge.

    Parameters
    ----------
    element : str or int
        Symbol, name or Z.
    energies_ev : array_like
        Electron energies (eV), > 0.
    energy_spread_ev : float, optional
        Gaussian energy spread of the electrons, full width at half maximum (eV), ≥ 0.

    Returns
    -------
    AppearanceCurves

    Examples
    --------
    >>> curves = appearance_curves("Kr", np.linspace(10.0, 200.0, 96))
    >>> curves.appearance_energy_ev(1), curves.appearance_energy_ev(2)
    (14.0, 40.0)
    """
    e, shape = as_float_array("energies_ev", energies_ev)
    if len(shape) > 1:
        raise InvalidParameterError(f"energies_ev must be one-dimensional; got shape {shape}")
    spread = as_float("energy_spread_ev", energy_spread_ev)
    return AppearanceCurves(element_symbol(element), e, _core._appearance_curves(element, e, spread), spread)


class ElectronImpactSource:
    """A single-collision electron-impact source (mass-spectrometer ion source).

    Each neutral atom meets at most one electron. Charges form by Lotz ionization of each
    subshell followed by relaxation of the hole (inner shells add charges), plus direct
    double ionization (Shevelko & Tawara 1995 form, parameters from memory, ±30 %).

    Parameters
    ----------
    energy_ev : float
        Electron energy (eV), > 0.
    energy_spread_ev : float, optional
        Gaussian energy spread, full width at half maximum (eV), ≥ 0.

    Examples
    --------
    >>> src = ElectronImpactSource(energy_ev=70.0, energy_spread_ev=0.5)
    >>> y = src.charge_yields("Xe")
    >>> y.charges.tolist()
    [1, 2]
    >>> 0.05 < y.ratio(2) < 0.5
    True
    """

    def __init__(self, energy_ev: float, energy_spread_ev: float = 0.0) -> None:
        self.energy_ev = as_float("energy_ev", energy_ev)
        self.energy_spread_ev = as_float("energy_spread_ev", energy_spread_ev)
        _core._impact_source_check(self.energy_ev, self.energy_spread_ev)

    def charge_yields(self, element: ElementLike) -> ChargeYields:
        """Relative yields of 1+, 2+, 3+ … for one collision with the neutral atom.

        Parameters
        ----------
        element : str or int
            Symbol, name or Z.

        Returns
        -------
        ChargeYields
        """
        sub, direct = _core._impact_cross_sections(element, self.energy_ev, self.energy_spread_ev)
        return ChargeYields(element_symbol(element), self.energy_ev, self.energy_spread_ev, sub, direct)

    def appearance_curves(self, element: ElementLike, energies_ev: Any) -> AppearanceCurves:
        """Energy scan with this source's energy spread; see :func:`appearance_curves`."""
        return appearance_curves(element, energies_ev, self.energy_spread_ev)

    def __repr__(self) -> str:
        return (
            f"ElectronImpactSource(energy_ev={self.energy_ev:g}, energy_spread_ev={self.energy_spread_ev:g})"
        )
