"""Radioactive-beam charge breeding: injection, capture, breeding with decay, extraction at a
repetition rate; and the residual-gas ions that the trap's partial pressures make."""

from __future__ import annotations

from typing import Any, Optional, cast

import numpy as np

from chargecast import _core
from chargecast._util import require_pandas, require_type


class BreedingCycle(_core.BreedingCycle):
    """Result of :func:`breeding_cycle`: ions of every nuclide of the decay chain.

    Attributes
    ----------
    nuclides : list of str
        The injected nuclide first, then its descendants (``"97Rb"``, ``"97Sr"``, …).
    half_lives_s : list of float or None
        Half-life of each nuclide (s), None for a stable one.
    times_s : ndarray
        Output times within the breeding (s); the last is the extraction.
    ions_per_bunch : float
        Ions arriving per bunch.
    efficiency : ndarray, shape (Z+1,)
        Fraction of the injected ions that leave in each charge state of the injected nuclide.
    trapped, decayed, lost : ndarray, shape (T,)
        Bookkeeping per bunch at each time; they add up to ``ions_per_bunch``.

    Examples
    --------
    >>> import chargecast as cc
    >>> beam = cc.ElectronBeam(energy_ev=1300.0, current_a=0.05, radius_m=70e-6)
    >>> trap = cc.BeamTrap(beam, 0.8)
    >>> run = cc.breeding_cycle(trap, "97Rb", repetition_rate_hz=20.0, ions_per_bunch=1e4, max_nuclides=2)
    >>> run.nuclides
    ['97Rb', '97Sr']
    >>> q, per_s = run.best_charge()
    >>> bool(per_s == run.extracted_per_s("97Rb")[q])
    True
    """

    def best_charge(self) -> tuple[int, float]:
        """The charge state of the injected nuclide with the most ions per second.

        Returns
        -------
        (int, float)
            Charge state and its ions per second at the separator.
        """
        per_s = self.extracted_per_s(self.nuclides[0])
        q = int(np.argmax(per_s))
        return q, float(per_s[q])

    def to_pandas(self) -> Any:
        """Extracted ions per second: one row per (nuclide, charge) with a non-zero count.

        Returns
        -------
        pandas.DataFrame
            Columns ``nuclide``, ``charge``, ``ions_per_s``, ``ions_per_bunch``.
        """
        pd = require_pandas()
        rows = []
        for name in self.nuclides:
            per_s = self.extracted_per_s(name)
            for q, n in enumerate(per_s):
                if n > 0:
                    rows.append((name, q, float(n), float(n) / self.repetition_rate_hz))
        return pd.DataFrame(rows, columns=["nuclide", "charge", "ions_per_s", "ions_per_bunch"])

    def __repr__(self) -> str:
        q, n = self.best_charge()
        return (
            f"BreedingCycle({self.nuclides[0]}, {self.ions_per_bunch:.3g} ions/bunch at "
            f"{self.repetition_rate_hz:.3g} Hz, best {q}+ {n:.3g} ions/s, "
            f"efficiency {self.efficiency[q]:.3g})"
        )


_core._register_result("BreedingCycle", BreedingCycle)


def breeding_cycle(
    trap: _core.BeamTrap,
    isotope: str,
    *,
    repetition_rate_hz: float,
    ions_per_s: Optional[float] = None,
    ions_per_bunch: Optional[float] = None,
    capture_efficiency: Optional[float] = None,
    breeding_time_s: Optional[float] = None,
    injected_charge: Optional[int] = None,
    daughter_charge: str = "parent",
    max_nuclides: Optional[int] = None,
    times_s: Any = None,
) -> BreedingCycle:
    """Charge breeding of a radioactive beam in an electron-beam trap, cycle by cycle.

    Every period 1/``repetition_rate_hz`` one bunch of singly charged ions reaches the trap; a
    fraction ``capture_efficiency`` is captured and bred for ``breeding_time_s``, then every
    ion is extracted. The injected nuclide decays during the wait upstream (continuous beam)
    and in the trap; its daughters (followed through the embedded decay channels) are bred
    too and leave as isobaric contaminants.

    Parameters
    ----------
    trap : BeamTrap
        The trap (beam, length, residual gas, processes; escape rates apply to the injected
        element).
    isotope : str
        The injected nuclide, e.g. ``"97Rb"``.
    repetition_rate_hz : float
        Extractions per second (Hz).
    ions_per_s : float, optional
        Continuous 1+ beam (ions/s), accumulated upstream between injections.
    ions_per_bunch : float, optional
        Or ions per bunch arriving at the trap (give exactly one of the two).
    capture_efficiency : float, optional
        Captured fraction of each bunch, in (0, 1]; 0.5 by default (a middle value of the tens
        of percent charge breeders report; give your breeder's measured value).
    breeding_time_s : float, optional
        Breeding time (s), at most the period; the whole period by default.
    injected_charge : int, optional
        Charge state of the injected ions; 1 by default.
    daughter_charge : {"parent", "electrons_kept"}
        Charge state a daughter enters in: the parent's (default), or the parent's plus the
        change of nuclear charge (all electrons kept: q+1 after β⁻, q−2 after α). Shake-off
        raises it further; see the module documentation of ``sources::rib_cycle``.
    max_nuclides : int, optional
        Most nuclides followed along the chains (8 by default); decays beyond are counted as
        decayed, not followed.
    times_s : array_like, optional
        Output times within the breeding (s), ascending; the extraction time is added.

    Returns
    -------
    BreedingCycle
        Ions per bunch and per second of every nuclide and charge state, efficiency into
        each charge state and the bookkeeping trapped + decayed + lost = injected.

    Examples
    --------
    >>> import chargecast as cc
    >>> beam = cc.ElectronBeam(energy_ev=5000.0, current_a=0.2, radius_m=100e-6)
    >>> trap = cc.BeamTrap(beam, 0.5, residual_gas_pa={"H2": 1e-9})
    >>> run = cc.breeding_cycle(trap, "97Rb", repetition_rate_hz=20.0, ions_per_s=1e6)
    >>> run.nuclides[:3]
    ['97Rb', '97Sr', '96Sr']
    >>> total = run.trapped[-1] + run.decayed[-1] + run.lost[-1]
    >>> bool(abs(total / run.ions_per_bunch - 1.0) < 1e-9)
    True
    """
    require_type("trap", trap, _core.BeamTrap, "a BeamTrap")
    require_type("isotope", isotope, str, 'an isotope such as "97Rb"')
    require_type("daughter_charge", daughter_charge, str, '"parent" or "electrons_kept"')
    # The core makes the result as the registered subclass above.
    out = _core.breeding_cycle(
        trap,
        isotope,
        repetition_rate_hz=repetition_rate_hz,
        ions_per_s=ions_per_s,
        ions_per_bunch=ions_per_bunch,
        capture_efficiency=capture_efficiency,
        breeding_time_s=breeding_time_s,
        injected_charge=injected_charge,
        daughter_charge=daughter_charge,
        max_nuclides=max_nuclides,
        times_s=times_s,
    )
    return cast(BreedingCycle, out)


def residual_gas_ions(trap: _core.BeamTrap, breeding_time_s: float) -> dict[str, np.ndarray]:
    """Residual-gas ions per extraction from the trap's partial pressures.

    Gas at density p/(k_B T_gas) in the beam volume π r² L; each atom of a molecule is ionized
    at its neutral-atom Lotz rate (additivity rule) and the singly charged ions are bred from
    an empty trap over ``breeding_time_s``.

    Parameters
    ----------
    trap : BeamTrap
        The trap with ``residual_gas_pa``.
    breeding_time_s : float
        Breeding (confinement) time (s), > 0.

    Returns
    -------
    dict of str to ndarray
        Element symbol → ions of each charge state 0…Z at extraction.

    Examples
    --------
    >>> import chargecast as cc
    >>> beam = cc.ElectronBeam(energy_ev=5000.0, current_a=0.2, radius_m=100e-6)
    >>> trap = cc.BeamTrap(beam, 0.5, residual_gas_pa={"CO": 1e-9})
    >>> sorted(residual_gas_ions(trap, 0.05))
    ['C', 'O']
    """
    out: dict[str, np.ndarray] = _core.residual_gas_ions(trap, breeding_time_s)
    return out
