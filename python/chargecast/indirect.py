"""Indirect and resonant electron-impact processes: excitation–autoionization (EA) and
dielectronic recombination (DR).

EA: an inner electron excited above the ion's ionization limit autoionizes (van Regemorter
1962 excitation, autoionization branching from scaling laws). DR: resonant capture with a
core excitation, energies from the subshell binding energies and a Slater-screened
hydrogenic captured electron, strengths from detailed balance; the Maxwellian rate from
Burgess's general formula (1965). Formulas, validity and measured accuracy are in the
Rust modules ``processes::excitation_autoionization`` and ``processes::dielectronic``
and in the README.
"""

from __future__ import annotations

from typing import Any, Optional, cast

from chargecast import _core
from chargecast._util import as_float, as_float_array, as_int, require_pandas, restore


def ionization_cross_section_cm2(
    element: str | int,
    charge: int,
    energies_ev: Any,
    a: Optional[float] = None,
    b: Optional[float] = None,
    c: Optional[float] = None,
) -> Any:
    """All single-ionization channels of one ion: Lotz direct ionization plus EA.

    Parameters
    ----------
    element : str or int
        Symbol, name or Z.
    charge : int
        Charge state of the target ion, 0 … Z−1.
    energies_ev : float or array_like
        Electron energies (eV), > 0.
    a, b, c : float, optional
        Lotz constants of the direct part, as in :func:`lotz_cross_section_cm2`.

    Returns
    -------
    float or ndarray
        Cross section (cm²), shaped like ``energies_ev``.

    Examples
    --------
    >>> import chargecast as cc
    >>> e = [300.0, 1100.0]
    >>> total = cc.ionization_cross_section_cm2("Fe", 15, e)
    >>> direct = cc.lotz_cross_section_cm2("Fe", 15, e)
    >>> bool(total[1] > 2 * direct[1])  # Na-like iron above its 2p excitation
    True
    """
    arr, shape = as_float_array("energies_ev", energies_ev)
    out = _core.ionization_cross_section_cm2(element, as_int("charge", charge), arr, a=a, b=b, c=c)
    return restore(out, shape)


def excitation_autoionization_cross_section_cm2(element: str | int, charge: int, energies_ev: Any) -> Any:
    """Excitation–autoionization cross section of one ion.

    Parameters
    ----------
    element : str or int
        Symbol, name or Z.
    charge : int
        Charge state of the target ion, 0 … Z−1.
    energies_ev : float or array_like
        Electron energies (eV), > 0.

    Returns
    -------
    float or ndarray
        Cross section (cm²), 0 below the lowest excitation above the ionization limit.

    Examples
    --------
    >>> import chargecast as cc
    >>> float(cc.excitation_autoionization_cross_section_cm2("Ne", 2, 500.0))  # none above the limit
    0.0
    """
    arr, shape = as_float_array("energies_ev", energies_ev)
    out = _core.excitation_autoionization_cross_section_cm2(element, as_int("charge", charge), arr)
    return restore(out, shape)


def excitation_autoionization_rate_coefficient_cm3_s(
    element: str | int, charge: int, temperatures_ev: Any
) -> Any:
    """Maxwellian EA rate coefficient of one ion.

    Parameters
    ----------
    element : str or int
        Symbol, name or Z.
    charge : int
        Charge state of the target ion, 0 … Z−1.
    temperatures_ev : float or array_like
        Electron temperatures kT (eV), > 0.

    Returns
    -------
    float or ndarray
        Rate coefficient ⟨σv⟩ (cm³ s⁻¹).

    Examples
    --------
    >>> import chargecast as cc
    >>> k = cc.excitation_autoionization_rate_coefficient_cm3_s("Fe", 15, [100.0, 1000.0])
    >>> bool(k[1] > 100 * k[0])  # the 2p channel opens near 730 eV
    True
    """
    arr, shape = as_float_array("temperatures_ev", temperatures_ev)
    out = _core.excitation_autoionization_rate_coefficient_cm3_s(element, as_int("charge", charge), arr)
    return restore(out, shape)


def dielectronic_rate_coefficient_cm3_s(element: str | int, charge: int, temperatures_ev: Any) -> Any:
    """Maxwellian DR rate coefficient of the recombining ion (Burgess 1965 general formula).

    Parameters
    ----------
    element : str or int
        Symbol, name or Z.
    charge : int
        Charge of the recombining ion, 0 … Z (0 for the neutral and Z for the bare ion give 0;
        so does charge 1, where the formula does not apply).
    temperatures_ev : float or array_like
        Electron temperatures kT (eV), > 0.

    Returns
    -------
    float or ndarray
        Rate coefficient (cm³ s⁻¹) for charge → charge − 1.

    Examples
    --------
    >>> import chargecast as cc
    >>> alpha = cc.dielectronic_rate_coefficient_cm3_s("Fe", 24, [1000.0, 2000.0])
    >>> [f"{a:.1e}" for a in alpha]
    ['1.2e-13', '5.6e-13']
    """
    arr, shape = as_float_array("temperatures_ev", temperatures_ev)
    out = _core.dielectronic_rate_coefficient_cm3_s(element, as_int("charge", charge), arr)
    return restore(out, shape)


def dielectronic_cross_section_cm2(
    element: str | int, charge: int, energies_ev: Any, energy_spread_ev: float = 0.0
) -> Any:
    """DR cross section seen by an electron beam: the resonances folded with a Gaussian.

    Parameters
    ----------
    element : str or int
        Symbol, name or Z.
    charge : int
        Charge of the recombining ion, 0 … Z.
    energies_ev : float or array_like
        Mean electron energies (eV), > 0.
    energy_spread_ev : float, optional
        Beam energy spread (FWHM, eV), ≥ 0; each resonance is widened in quadrature by its
        natural width.

    Returns
    -------
    float or ndarray
        Cross section (cm²) for charge → charge − 1.

    Examples
    --------
    >>> import chargecast as cc
    >>> kll = float(cc.dr_resonances("Fe", 24).energies_ev[0])
    >>> on = float(cc.dielectronic_cross_section_cm2("Fe", 24, kll, energy_spread_ev=10.0))
    >>> off = float(cc.dielectronic_cross_section_cm2("Fe", 24, kll + 200.0, energy_spread_ev=10.0))
    >>> on > 1e-20 and off == 0.0
    True
    """
    arr, shape = as_float_array("energies_ev", energies_ev)
    out = _core.dielectronic_cross_section_cm2(
        element, as_int("charge", charge), arr, as_float("energy_spread_ev", energy_spread_ev)
    )
    return restore(out, shape)


class DrResonances(_core.DrResonances):
    """Dielectronic resonance groups of one recombining ion, sorted by energy.

    Made by :func:`dr_resonances`: ``element``, ``charge``, ``energies_ev`` (eV),
    ``strengths_cm2_ev`` (cm² eV), ``natural_widths_ev`` (eV), ``core_subshells`` (the excited
    core electron, "1s", "2p", …), ``core_shells`` (the shell it reaches) and
    ``capture_shells`` (the captured electron's shell). KLL for He-like iron is
    ``core_subshells == "1s"``, ``core_shells == 2``, ``capture_shells == 2``.

    Examples
    --------
    >>> import chargecast as cc
    >>> r = cc.dr_resonances("Ar", 16)
    >>> r.core_subshells[0], r.core_shells[0], r.capture_shells[0]
    ('1s', 2, 2)
    """

    __slots__ = ()

    def to_pandas(self) -> Any:
        """One row per resonance group.

        Returns
        -------
        pandas.DataFrame
            Columns ``energy_ev``, ``strength_cm2_ev``, ``natural_width_ev``,
            ``core_subshell``, ``core_shell``, ``capture_shell``.
        """
        pd = require_pandas()
        return pd.DataFrame(
            {
                "energy_ev": self.energies_ev,
                "strength_cm2_ev": self.strengths_cm2_ev,
                "natural_width_ev": self.natural_widths_ev,
                "core_subshell": self.core_subshells,
                "core_shell": self.core_shells,
                "capture_shell": self.capture_shells,
            }
        )

    def bands_ev(self, min_fraction: float = 1e-3) -> list[tuple[float, float]]:
        """Energy bands (eV) covered by the resonances of each core excitation.

        Parameters
        ----------
        min_fraction : float, optional
            Resonances weaker than this fraction of the strongest are left out.

        Returns
        -------
        list of (low_ev, high_ev)
            One band per (core subshell, core shell), from its lowest to its highest
            resonance energy.
        """
        strengths = self.strengths_cm2_ev
        if len(strengths) == 0:
            return []
        cut = float(strengths.max()) * as_float("min_fraction", min_fraction)
        bands: dict[tuple[str, int], list[float]] = {}
        for e, s, sub, n in zip(self.energies_ev, strengths, self.core_subshells, self.core_shells):
            if s >= cut:
                bands.setdefault((sub, n), []).append(float(e))
        return sorted((min(v), max(v)) for v in bands.values())

    def __repr__(self) -> str:
        return f"DrResonances({self.element!r}, charge={self.charge}, {len(self)} groups)"


_core._register_result("DrResonances", DrResonances)


def dr_resonances(element: str | int, charge: int) -> DrResonances:
    """Dielectronic resonances of one recombining ion (Δn ≥ 1 core excitations).

    Parameters
    ----------
    element : str or int
        Symbol, name or Z.
    charge : int
        Charge of the recombining ion, 0 … Z (the neutral atom and the bare ion have none).

    Returns
    -------
    DrResonances
        ``energies_ev``, ``strengths_cm2_ev``, ``capture_shells`` and the core excitation of
        each resonance group.

    Examples
    --------
    >>> import chargecast as cc
    >>> r = cc.dr_resonances("Fe", charge=24)
    >>> kll = float(r.energies_ev[0])  # 1s² + e → 1s 2l 2l'
    >>> 4500 < kll < 4700
    True
    """
    return cast(DrResonances, _core.dr_resonances(element, as_int("charge", charge)))
