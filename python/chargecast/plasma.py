"""The plasma ion source (ECR type): steady state, switch-on evolution, extracted currents in
eµA and the analysed-beam spectrum, plus the Maxwellian radiative-recombination and
charge-exchange rate coefficients. The classes are the compiled ones; the Python classes add
docstrings, tables and figures."""

from __future__ import annotations

import html
import warnings
from typing import Any, Optional

import numpy as np

from chargecast import _core
from chargecast._core import ChargecastWarning
from chargecast._util import (
    PALETTE,
    as_float_array,
    as_int,
    inline_png,
    require_pandas,
    require_pyplot,
    restore,
)


def radiative_recombination_rate_coefficient_cm3_s(
    element: str | int, charge: int, temperature_ev: Any
) -> Any:
    """Maxwellian rate coefficient ⟨σv⟩ of radiative recombination, q → q−1.

    The Kim–Pratt cross section (Kim & Pratt 1983) averaged over a Maxwellian in closed
    form. Within 2 % of the exact hydrogenic values for hydrogen at 5 000–20 000 K; about a
    factor 1.5 for ions with electrons.

    Parameters
    ----------
    element : str or int
        Symbol, name or Z.
    charge : int
        Charge of the capturing ion, 1 … Z.
    temperature_ev : float or array_like
        Electron temperatures kT (eV), > 0.

    Returns
    -------
    float or ndarray
        Rate coefficient (cm³ s⁻¹), shaped like ``temperature_ev``.

    Examples
    --------
    >>> a = radiative_recombination_rate_coefficient_cm3_s("H", charge=1, temperature_ev=0.8617)
    >>> 4.0e-13 < a < 4.4e-13
    True
    """
    arr, shape = as_float_array("temperature_ev", temperature_ev)
    out = _core.radiative_recombination_rate_coefficient_cm3_s(element, as_int("charge", charge), arr)
    return restore(out, shape)


def charge_exchange_rate_coefficient_cm3_s(
    element: str | int, charge: int, gas: str, ion_temperature_ev: Any
) -> Any:
    """Rate coefficient σ·v̄ of single-electron capture from a gas at rest, q → q−1.

    Müller & Salzborn (1977) cross section times the Maxwellian mean ion speed
    √(8kT_i/(πm)); 0 where the capture would be endothermic. About a factor 2.

    Parameters
    ----------
    element : str or int
        Symbol, name or Z of the ion.
    charge : int
        Charge of the ion, 1 … Z.
    gas : str
        Target gas formula (H2, He, N2, O2, CO, CO2, H2O, CH4, Ne, Ar, Kr, Xe).
    ion_temperature_ev : float or array_like
        Ion temperatures kT_i (eV), > 0.

    Returns
    -------
    float or ndarray
        Rate coefficient (cm³ s⁻¹), shaped like ``ion_temperature_ev``.

    Examples
    --------
    >>> k = charge_exchange_rate_coefficient_cm3_s("Ar", 8, "O2", 1.0)
    >>> 1e-10 < k < 1e-8
    True
    """
    arr, shape = as_float_array("ion_temperature_ev", ion_temperature_ev)
    out = _core.charge_exchange_rate_coefficient_cm3_s(element, as_int("charge", charge), gas, arr)
    return restore(out, shape)


class PlasmaSource(_core.PlasmaSource):
    """A plasma ion source (ECR type): hot electrons, ions confined for τ_q, fed with gas.

    Zero-dimensional rate balance per element, in densities (cm⁻³): ionization (Lotz,
    Maxwellian closed form), radiative recombination (Kim–Pratt, Maxwellian), charge
    exchange on the neutral gases (Müller–Salzborn at the ion temperature), ion loss
    n_q/τ_q and neutral feed n_X/τ₀ (formulas, sources and accuracy in
    ``src/sources/plasma.rs``). Extracted current I_q = η·q·e·n_q·V/τ_q.

    Parameters
    ----------
    electron_temperature_ev : float
        Temperature kT_e (eV) of the (cold) Maxwellian electrons.
    electron_density_cm3 : float
        Electron density n_e (cm⁻³).
    confinement_time_s : float or array_like
        τ₁ (s) of τ_q = τ₁·q^α, or one time (s) per charge 1, 2, … up to the largest Z fed.
    gas_feed_pa : dict of str to float
        Fed gases (formula → partial pressure, Pa), e.g. ``{"Ar": 2e-5, "O2": 8e-5}``
        (gas mixing). Molecules count as their atoms.
    confinement_exponent : float, optional
        α of the scaling; 1.0 by default (0.5–1 is common practice).
    residual_gas_pa : dict of str to float, optional
        Residual gases (Pa): ionized and charge-exchange targets like the feed, marked
        residual in the spectrum.
    hot_electron_temperature_ev : float, optional
        kT_h (eV) of a hot electron population.
    hot_electron_fraction : float, optional
        Fraction 0…1 of the electrons that are hot; 0 by default.
    ion_temperature_ev : float, optional
        Ion temperature kT_i (eV) for charge exchange; 1 eV by default.
    gas_temperature_k : float, optional
        Gas temperature (K) for n = p/(k_B T); 300 K by default.
    neutral_residence_time_s : float, optional
        Neutral residence time τ₀ (s); 1.25e-4 s by default (a thermal atom across 5 cm).
    wall_recycling : float, optional
        Fraction 0…1 of lost ions that return as neutrals; 0 by default.
    plasma_volume_m3 : float, optional
        Plasma volume V (m³); 1e-4 m³ by default.
    extraction_fraction : float, optional
        Fraction η (0, 1] of the lost ions that reach the extraction; 1 by default (the
        currents are then upper bounds).

    Examples
    --------
    >>> src = PlasmaSource(electron_temperature_ev=2000.0, electron_density_cm3=3e11,
    ...                    confinement_time_s=2e-3, gas_feed_pa={"Ar": 2e-5, "O2": 8e-5})
    >>> src.elements
    ['Ar', 'O']
    >>> state = src.steady_state("Ar")
    >>> abs(state.outflow_atoms_per_s / state.feed_atoms_per_s - 1) < 1e-9
    True
    """

    __slots__ = ()

    def __new__(
        cls,
        *,
        electron_temperature_ev: float,
        electron_density_cm3: float,
        confinement_time_s: Any,
        gas_feed_pa: dict[str, float],
        confinement_exponent: Optional[float] = None,
        residual_gas_pa: Optional[dict[str, float]] = None,
        hot_electron_temperature_ev: Optional[float] = None,
        hot_electron_fraction: Optional[float] = None,
        ion_temperature_ev: Optional[float] = None,
        gas_temperature_k: Optional[float] = None,
        neutral_residence_time_s: Optional[float] = None,
        wall_recycling: Optional[float] = None,
        plasma_volume_m3: Optional[float] = None,
        extraction_fraction: Optional[float] = None,
    ) -> PlasmaSource:
        return super().__new__(
            cls,
            electron_temperature_ev=electron_temperature_ev,
            electron_density_cm3=electron_density_cm3,
            confinement_time_s=confinement_time_s,
            gas_feed_pa=gas_feed_pa,
            confinement_exponent=confinement_exponent,
            residual_gas_pa=residual_gas_pa,
            hot_electron_temperature_ev=hot_electron_temperature_ev,
            hot_electron_fraction=hot_electron_fraction,
            ion_temperature_ev=ion_temperature_ev,
            gas_temperature_k=gas_temperature_k,
            neutral_residence_time_s=neutral_residence_time_s,
            wall_recycling=wall_recycling,
            plasma_volume_m3=plasma_volume_m3,
            extraction_fraction=extraction_fraction,
        )

    def steady_state(self, element: str | int) -> PlasmaState:  # type: ignore[override]
        """Steady state of one element: densities, fractions and extracted currents.

        Parameters
        ----------
        element : str or int
            One of :attr:`elements`.

        Returns
        -------
        PlasmaState
        """
        return super().steady_state(element)  # type: ignore[return-value]

    def steady_states(self) -> dict[str, PlasmaState]:
        """The steady state of every element the gases bring, feed first.

        Returns
        -------
        dict of str to PlasmaState

        Warns
        -----
        ChargecastWarning
            When the ions' charge Σ q n_q over all elements exceeds the electron density
            (the balance has no quasi-neutrality constraint: lower the feed or τ, or raise n_e).
        """
        states = {el: self.steady_state(el) for el in self.elements}
        n_e = self.electron_density_cm3
        ratio = sum(s.charge_density_ratio for s in states.values())
        note = _core._quasi_neutrality_note(ratio * n_e, n_e)
        if note is not None:
            warnings.warn(note, ChargecastWarning, stacklevel=2)
        return states

    def beam_spectrum(self) -> Any:
        """The analysed beam: every ion of every element on the A/q axis, intensity in eµA.

        Lines from :func:`chargecast.aq_lines` with each element's extracted currents per
        charge as its "fractions" (natural isotopic shares), residual-gas elements marked.
        Draw it at a separator's resolving power with ``.plot(resolving_power=R)``.

        Returns
        -------
        LineList
            ``intensity`` in eµA.
        """
        from chargecast.spectrum import aq_lines

        states = self.steady_states()
        feed = {el: s.currents_eua for el, s in states.items() if not s.residual}
        residual = {el: (1.0, s.currents_eua) for el, s in states.items() if s.residual}
        return aq_lines(feed, residual_gas=residual)

    def __repr__(self) -> str:
        gases = ", ".join(f"{g}: {p:.3g} Pa" for g, p in self.gas_feed_pa.items())
        return (
            f"PlasmaSource(kT_e={self.electron_temperature_ev:g} eV, "
            f"n_e={self.electron_density_cm3:.3g} cm⁻³, gas_feed_pa={{{gases}}})"
        )


class PlasmaState(_core.PlasmaState):
    """Steady state of one element in a :class:`PlasmaSource`.

    Attributes: ``element``, ``charges`` (0 … Z), ``densities_cm3``, ``fractions`` (of all
    the element's atoms in the plasma), ``currents_eua`` (extracted, eµA),
    ``confinement_times_s``, ``feed_atoms_per_s``, ``outflow_atoms_per_s`` (equal in steady
    state), ``charge_density_ratio`` (Σ q n_q / n_e) and ``residual``.

    Examples
    --------
    >>> src = PlasmaSource(electron_temperature_ev=1500.0, electron_density_cm3=5e11,
    ...                    confinement_time_s=1e-3, gas_feed_pa={"Ar": 5e-7})
    >>> state = src.steady_state("Ar")
    >>> int(state.charges[-1]), round(float(state.fractions.sum()), 12)
    (18, 1.0)
    >>> bool(state.currents_eua[8] > 0)
    True
    """

    __slots__ = ()

    def to_pandas(self) -> Any:
        """One row per charge.

        Returns
        -------
        pandas.DataFrame
            Columns ``density_cm3``, ``fraction``, ``current_eua``, ``confinement_time_s``;
            index ``charge``.
        """
        pd = require_pandas()
        return pd.DataFrame(
            {
                "density_cm3": self.densities_cm3,
                "fraction": self.fractions,
                "current_eua": self.currents_eua,
                "confinement_time_s": self.confinement_times_s,
            },
            index=pd.Index(self.charges, name="charge"),
        )

    def plot(self, ax: Any | None = None) -> Any:
        """Bar chart of the extracted current (eµA) per charge state (log scale).

        Returns
        -------
        matplotlib Axes
        """
        plt = require_pyplot()
        if ax is None:
            _, ax = plt.subplots(figsize=(6, 3.5))
        q = self.charges[1:]
        i = self.currents_eua[1:]
        ax.bar(q, np.where(i > 0, i, np.nan), color=PALETTE[0])
        ax.set_yscale("log")
        ax.set_xlabel("charge")
        ax.set_ylabel("extracted current (eµA)")
        ax.set_title(f"{self.element}, plasma source steady state", fontsize=10)
        return ax

    def _repr_html_(self) -> str:
        rows = "".join(
            f"<tr><td>{q}+</td><td>{n:.3e}</td><td>{i:.4g}</td></tr>"
            for q, n, i in zip(self.charges[1:], self.densities_cm3[1:], self.currents_eua[1:])
            if i > 0
        )
        head = html.escape(f"{self.element}: plasma steady state")
        return (
            f"<b>{head}</b><table><tr><th>charge</th><th>n (cm⁻³)</th><th>I (eµA)</th></tr>{rows}</table>"
            + inline_png(self.plot)
        )

    def __repr__(self) -> str:
        top = np.argsort(self.currents_eua)[::-1][:3]
        best = ", ".join(f"{q}+: {self.currents_eua[q]:.3g} eµA" for q in top if self.currents_eua[q] > 0)
        return f"PlasmaState({self.element!r}: {best})"


_core._register_result("PlasmaState", PlasmaState)
