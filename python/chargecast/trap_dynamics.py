"""The beam trap's ion-dynamics model: the result of ``BeamTrap(..., model="dynamic").evolve``.

The class is the compiled one; this subclass adds its documentation, a figure of kT and
overlap against time, a table and a readable repr.
"""

from __future__ import annotations

from typing import Any, Optional

import numpy as np

from chargecast import _core
from chargecast._util import PALETTE, require_pandas, require_pyplot

#: Units of the table's columns.
RUN_UNITS = {
    "time_s": "s",
    "charge": "e",
    "ions": "1 (particles in the trap)",
    "fraction": "1 (fraction of the species' particles)",
    "temperature_ev": "eV (kT)",
    "escape_per_s": "1/s (particles leaving over both barriers)",
    "overlap": "1 (share of the cloud inside the beam)",
}


class DynamicRun(_core.DynamicRun):
    """Particles, temperatures, escape fluxes and overlaps of every species and charge in
    an electron-beam trap over time (the ion-dynamics model).

    Made by ``BeamTrap.evolve`` (and ``steady_state``, one row at ``times_s = [inf]``) of a
    trap built with ``model="dynamic"``.

    Per species (``"Kr"``, ``"84Kr"``, and the elements of fed gases; see ``species``), arrays
    of shape [T, Z+1] (charge 0 = neutral atoms in the beam):

    - ``fractions(species)``: charge-state fractions of the species' particles present;
    - ``ions(species)``: particles in the trap;
    - ``temperatures_ev(species)``: kT (eV);
    - ``escape_per_s(species)``: particles leaving per second over both barriers (what a
      leaky-mode extraction delivers);
    - ``overlap(species)``: share of each cloud inside the electron beam (0…1).

    Over time [T]: ``compensation`` (trapped positive charge over the electrons' charge)
    and ``well_depth_v`` (radial well, axis to drift tube). Bookkeeping: ``fed``,
    ``escaped``, ``trapped``, ``energy_in_ev``, ``energy_out_ev``, ``thermal_energy_ev`` and
    the largest relative misses ``particle_balance`` and ``energy_balance``. ``model`` is
    ``"dynamic"``.

    Examples
    --------
    >>> import chargecast as cc
    >>> beam = cc.ElectronBeam(3000.0, 0.1, current_density_a_cm2=300.0)
    >>> trap = cc.BeamTrap(beam, length_m=0.5, residual_gas_pa={"H2": 1e-8}, model="dynamic")
    >>> run = trap.evolve({"Ar": 1e6}, [1e-3, 1e-2])
    >>> run.model, run.species, run.fractions("Ar").shape  # H: ions of the residual H2
    ('dynamic', ['Ar', 'H'], (2, 19))
    >>> bool(run.particle_balance < 1e-9)
    True
    """

    __slots__ = ()

    def plot(
        self, species: Optional[str] = None, charges: Optional[Any] = None, ax: Optional[Any] = None
    ) -> Any:
        """kT (top) and overlap with the beam (bottom) of a species' charge states against
        time.

        Parameters
        ----------
        species : str, optional
            Species label; the first species by default.
        charges : sequence of int, optional
            Charge states to draw; by default the three most populated at the last time
            and their neighbours.
        ax : sequence of two matplotlib Axes, optional
            Axes for the temperature and the overlap panels.

        Returns
        -------
        numpy.ndarray of matplotlib Axes
            The two panels.
        """
        plt = require_pyplot()
        name = species if species is not None else self.species[0]
        temperatures = self.temperatures_ev(name)
        overlap = self.overlap(name)
        ions = self.ions(name)
        if charges is None:
            top = np.argsort(ions[-1])[::-1][:3]
            picked = sorted({int(q) + d for q in top for d in (-1, 0, 1)})
            charges = [q for q in picked if 1 <= q < ions.shape[1]]
        if ax is None:
            _, ax = plt.subplots(2, 1, figsize=(7, 6), sharex=True)
        t = np.where(self.times_s > 0, self.times_s, np.nan)
        for k, q in enumerate(charges):
            colour = PALETTE[k % len(PALETTE)]
            ax[0].plot(t, temperatures[:, q], color=colour, label=f"{name}{q}+")
            ax[1].plot(t, overlap[:, q], color=colour)
        ax[0].set_xscale("log")
        ax[0].set_yscale("log")
        ax[0].set_ylabel("kT (eV)")
        ax[0].legend(fontsize=8, ncol=3)
        ax[0].set_title(f"{name} in the trap (dynamic model)", fontsize=10)
        ax[1].set_ylabel("overlap with the beam")
        ax[1].set_ylim(0, 1.05)
        ax[1].set_xlabel("confinement time (s)")
        return np.asarray(ax)

    def to_pandas(self) -> Any:
        """The run as a long table: one row per species, time and charge.

        Returns
        -------
        pandas.DataFrame
            Columns ``species``, ``time_s``, ``charge``, ``ions``, ``fraction``,
            ``temperature_ev``, ``escape_per_s``, ``overlap``; units in ``DataFrame.attrs``.
        """
        pd = require_pandas()
        frames = []
        t = self.times_s
        for name in self.species:
            ions = self.ions(name)
            n_t, n_q = ions.shape
            frames.append(
                pd.DataFrame(
                    {
                        "species": name,
                        "time_s": np.repeat(t, n_q),
                        "charge": np.tile(np.arange(n_q), n_t),
                        "ions": ions.reshape(-1),
                        "fraction": self.fractions(name).reshape(-1),
                        "temperature_ev": self.temperatures_ev(name).reshape(-1),
                        "escape_per_s": self.escape_per_s(name).reshape(-1),
                        "overlap": self.overlap(name).reshape(-1),
                    }
                )
            )
        frame = pd.concat(frames, ignore_index=True)
        frame.attrs["units"] = dict(RUN_UNITS)
        frame.attrs["model"] = self.model
        return frame

    def __repr__(self) -> str:
        t = self.times_s
        when = (
            "steady state"
            if len(t) == 1 and np.isinf(t[0])
            else f"{len(t)} times, {t[0]:.3g} … {t[-1]:.3g} s"
        )
        return (
            f"DynamicRun(model={self.model!r}, species={self.species}, {when}, "
            f"particle_balance={self.particle_balance:.1e}, energy_balance={self.energy_balance:.1e})"
        )


_core._register_result("DynamicRun", DynamicRun)
