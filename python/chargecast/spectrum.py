"""Where ions land on the m/q (A/q) axis: exact ion masses, line lists, overlaps at a
resolving power and the cleanest charge state of a target isotope.

Units: masses in u, m/q in u per elementary charge (u/e), A/q with A the mass number.
Resolving power R = (m/q)/Δ(m/q) with Δ(m/q) the full width at half maximum (FWHM) of a
peak; at a fixed R each peak's FWHM is its own m/q divided by R. Two peaks count as
separated when their centres lie one FWHM apart, so the resolving power needed to split a
pair is (m/q)/|Δ(m/q)|.
"""

from __future__ import annotations

import contextlib
import html
from collections.abc import Iterator, Mapping
from typing import Any

import numpy as np

from chargecast import _core
from chargecast._core import ArgumentTypeError, ChargecastError, InvalidParameterError
from chargecast._util import as_float, as_int, require_pandas, require_pyplot

__all__ = [
    "DEFAULT_RESIDUAL_GAS",
    "ChargeStateRanking",
    "LineList",
    "OverlapReport",
    "aq_lines",
    "clean_charge_states",
    "ion_mass_u",
    "overlaps",
]

#: Residual-gas elements added by :func:`aq_lines` when ``residual_gas`` is not given, each
#: with this relative amount spread evenly over the charges 1+ … 3+ (1+ only for H). The
#: amounts mark where residual-gas ions land; they are not a prediction of their intensity.
#: Pass your own mapping (or ``{}`` for none) to quantify contamination.
DEFAULT_RESIDUAL_GAS: dict[str, float] = {"H": 0.1, "C": 0.1, "N": 0.1, "O": 0.1, "Ar": 0.1}

#: Highest charge of the even spread used when a residual gas is given by amount only.
RESIDUAL_MAX_CHARGE = 3

_LINE_COLUMNS = (
    "label",
    "isotope",
    "z",
    "mass_number",
    "charge",
    "mass_u",
    "m_over_q",
    "a_over_q",
    "intensity",
    "residual",
)
_TARGET_COLOUR, _INTERFERER_COLOUR, _OTHER_COLOUR, _RESIDUAL_COLOUR = (
    "#D55E00",
    "#0072B2",
    "#7F7F7F",
    "#009E73",
)
_MAX_ROWS = 40

SpeciesValue = Any
Species = Mapping[str, SpeciesValue]


def _core_call(fn: Any, *args: Any) -> Any:
    """Call the extension; a wrong argument type becomes an InvalidParameterError."""
    try:
        return fn(*args)
    except ChargecastError:
        raise
    except (TypeError, OverflowError, ValueError) as exc:
        raise InvalidParameterError(f"invalid argument: {exc}") from None


def _spec(name: str, value: Any) -> str:
    if not isinstance(value, str):
        raise InvalidParameterError(
            f'invalid {name} = {value!r}: give an isotope as a string such as "84Kr", "Kr84" or "Kr-84"'
        )
    return value


def ion_mass_u(isotope: str, charge: int) -> float:
    """Mass of an ion, m_atom − q·m_e + B_q/c², with B_q the sum of the first q ionization energies.

    Parameters
    ----------
    isotope : str
        ``"84Kr"``, ``"Kr84"`` or ``"Kr-84"``; an element alone only if it has a single
        natural isotope (``"Au"``).
    charge : int
        Charge state 0 … Z (0 gives the atomic mass).

    Returns
    -------
    float
        Ion mass in u.

    Examples
    --------
    >>> ion_mass_u("12C", 0)
    12.0
    >>> round(ion_mass_u("C-12", 6), 9)  # 12 − 6 m_e + (all six ionization energies)/c²
    11.996709626
    """
    return float(_core_call(_core._ion_mass_u, _spec("isotope", isotope), as_int("charge", charge)))


def _fractions(spec: str, value: Any) -> list[float]:
    """Charge-state fractions from an array, a {charge: fraction} mapping or an object with ``.fractions``."""
    if hasattr(value, "fractions") and not isinstance(value, (np.ndarray, Mapping, list, tuple)):
        value = value.fractions
    if isinstance(value, Mapping):
        z = _core_call(_core._species_info, spec)[0]
        out = np.zeros(z + 1)
        for q, f in value.items():
            q = as_int(f"charge in the fractions of {spec}", q)
            if not 0 <= q <= z:
                raise InvalidParameterError(f"invalid charge {q} in the fractions of {spec}: allowed 0..={z}")
            out[q] = as_float(f"fraction of {spec} {q}+", f)
        return out.tolist()
    try:
        arr = np.asarray(value, dtype=np.float64)
    except (TypeError, ValueError, OverflowError) as exc:
        raise InvalidParameterError(
            f"invalid fractions of {spec}: must be an array of numbers, one per charge 0..Z ({exc})"
        ) from None
    if arr.ndim != 1:
        raise InvalidParameterError(
            f"invalid fractions of {spec}: need one value per charge 0..Z (a 1-D array), "
            f"got shape {arr.shape}; for an evolution pick one time, e.g. evo.at(0.2)"
        )
    return arr.tolist()


def _residual_entries(residual_gas: Mapping[str, Any] | None) -> list[tuple[str, float, list[float], bool]]:
    gases = DEFAULT_RESIDUAL_GAS if residual_gas is None else residual_gas
    if not isinstance(gases, Mapping):
        raise InvalidParameterError(f'invalid residual_gas = {gases!r}: must be a dict such as {{"N": 0.1}}')
    entries = []
    for spec, value in gases.items():
        spec = _spec("residual gas", spec)
        if isinstance(value, tuple) and len(value) == 2:
            amount, fractions = as_float(f"amount of {spec}", value[0]), _fractions(spec, value[1])
        elif isinstance(value, (int, float, np.number)) and not isinstance(value, bool):
            z = _core_call(_core._species_info, spec)[0]
            top = min(RESIDUAL_MAX_CHARGE, z)
            fractions = [0.0] + [1.0 / top] * top + [0.0] * (z - top)
            amount = float(value)
        else:
            amount, fractions = 1.0, _fractions(spec, value)
        entries.append((spec, amount, fractions, True))
    return entries


def aq_lines(
    species: Species,
    amounts: Mapping[str, float] | None = None,
    residual_gas: Mapping[str, Any] | None = None,
) -> LineList:
    """Every ion of a source on the m/q axis, with its relative intensity.

    Intensity of a line = amount × isotopic share × charge-state fraction, where the
    isotopic share is the natural abundance for an element and 1 for a named isotope.
    Neutral atoms (charge 0) make no line; lines of zero intensity are left out; the same
    ion from two entries is one line.

    Parameters
    ----------
    species : dict
        Element (``"Kr"``, natural isotopic mix) or isotope (``"84Kr"``, ``"Kr84"``,
        ``"Kr-84"``) → charge-state fractions: an array of length Z+1 (charge 0 … Z), a
        ``{charge: fraction}`` dict, or an object exposing a 1-D ``.fractions`` (a source
        result at one time; for an :class:`Evolution` use ``evo.at(time_s)``).
    amounts : dict, optional
        Relative amount of each key of ``species`` (default 1 each), ≥ 0.
    residual_gas : dict, optional
        Residual-gas elements → a relative amount (spread evenly over 1+ … 3+), a
        ``(amount, fractions)`` pair, or fractions (amount 1). Default
        :data:`DEFAULT_RESIDUAL_GAS` (H, C, N, O, Ar at 0.1 each, marking where they land);
        ``{}`` for none.

    Returns
    -------
    LineList
        Lines sorted by m/q.

    Examples
    --------
    >>> lines = aq_lines({"Ne": {1: 0.6, 2: 0.4}}, residual_gas={"Ar": 1.0})
    >>> len(lines)  # 3 Ne isotopes × 2 charges + 3 Ar isotopes × 3 charges
    15
    >>> [str(s) for s in lines.label[:4]]
    ['20Ne2+', '21Ne2+', '22Ne2+', '36Ar3+']
    >>> round(float(lines.intensity[0]), 4)  # 0.4 × natural abundance of 20Ne
    0.3619
    """
    if not isinstance(species, Mapping):
        raise InvalidParameterError(
            f'invalid species = {species!r}: must be a dict such as {{"Kr": fractions}}'
        )
    amounts = {} if amounts is None else amounts
    if not isinstance(amounts, Mapping):
        raise InvalidParameterError(f'invalid amounts = {amounts!r}: must be a dict such as {{"Kr": 1.0}}')
    unknown = [k for k in amounts if k not in species]
    if unknown:
        raise InvalidParameterError(f"invalid amounts: {unknown!r} not among the species {list(species)!r}")
    entries = [
        (
            _spec("species", spec),
            as_float(f"amount of {spec}", amounts.get(spec, 1.0)),
            _fractions(spec, value),
            False,
        )
        for spec, value in species.items()
    ]
    entries += _residual_entries(residual_gas)
    return LineList._from_core(_core_call(_core._aq_lines, entries))


class _Table:
    """Column storage with text, HTML and pandas views."""

    _columns: tuple[str, ...] = ()
    _formats: dict[str, str] = {}

    def _table_columns(self) -> dict[str, np.ndarray]:
        return {c: getattr(self, c) for c in self._columns}

    def __len__(self) -> int:
        return len(getattr(self, self._columns[0]))

    def to_pandas(self) -> Any:
        """The table as a pandas DataFrame, one row per entry.

        Returns
        -------
        pandas.DataFrame
        """
        pd = require_pandas()
        return pd.DataFrame(self._table_columns())

    def _cells(self) -> tuple[list[str], list[list[str]]]:
        cols = self._table_columns()
        rows = []
        for i in range(min(len(self), _MAX_ROWS)):
            row = []
            for name, values in cols.items():
                v = values[i]
                fmt = self._formats.get(name)
                row.append("" if v is None else format(v, fmt) if fmt else str(v))
            rows.append(row)
        return list(cols), rows

    def _title(self) -> str:
        return type(self).__name__

    def _text_table(self) -> str:
        header, rows = self._cells()
        widths = [max([len(h)] + [len(r[j]) for r in rows]) for j, h in enumerate(header)]
        lines = ["  ".join(h.rjust(w) for h, w in zip(header, widths))]
        lines += ["  ".join(c.rjust(w) for c, w in zip(r, widths)) for r in rows]
        if len(self) > _MAX_ROWS:
            lines.append(f"… {len(self) - _MAX_ROWS} more rows")
        return "\n".join(lines)

    def __repr__(self) -> str:
        return f"{self._title()}\n{self._text_table()}"

    def _repr_html_(self) -> str:
        header, rows = self._cells()
        head = "".join(f"<th>{html.escape(h)}</th>" for h in header)
        body = "".join("<tr>" + "".join(f"<td>{html.escape(c)}</td>" for c in r) + "</tr>" for r in rows)
        more = f"<p>… {len(self) - _MAX_ROWS} more rows</p>" if len(self) > _MAX_ROWS else ""
        return f"<b>{html.escape(self._title())}</b><table><tr>{head}</tr>{body}</table>{more}"


class _LineColumns(_Table):
    """A table whose rows are lines (isotope, charge, masses, intensity)."""

    label: np.ndarray
    isotope: np.ndarray
    z: np.ndarray
    mass_number: np.ndarray
    charge: np.ndarray
    mass_u: np.ndarray
    m_over_q: np.ndarray
    a_over_q: np.ndarray
    intensity: np.ndarray
    residual: np.ndarray

    def _set_lines(self, d: Mapping[str, Any]) -> None:
        self.label = np.array(d["label"], dtype=str)
        self.isotope = np.array(d["isotope"], dtype=str)
        self.z = np.array(d["z"], dtype=np.int64)
        self.mass_number = np.array(d["mass_number"], dtype=np.int64)
        self.charge = np.array(d["charge"], dtype=np.int64)
        self.mass_u = np.asarray(d["mass_u"], dtype=np.float64)
        self.m_over_q = np.asarray(d["m_over_q"], dtype=np.float64)
        self.a_over_q = np.asarray(d["a_over_q"], dtype=np.float64)
        self.intensity = np.asarray(d["intensity"], dtype=np.float64)
        self.residual = np.array(d["residual"], dtype=bool)


class LineList(_LineColumns):
    """Ions of a source on the m/q axis, sorted by m/q; made by :func:`aq_lines`.

    Attributes
    ----------
    label : ndarray of str
        Ion, e.g. ``"84Kr26+"``.
    isotope : ndarray of str
        Isotope, e.g. ``"84Kr"``.
    z, mass_number, charge : ndarray of int
        Atomic number, mass number A, charge state q ≥ 1.
    mass_u : ndarray of float
        Ion mass (u), electrons removed and their binding energy added back.
    m_over_q : ndarray of float
        m/q (u/e).
    a_over_q : ndarray of float
        A/q.
    intensity : ndarray of float
        amount × isotopic share × charge-state fraction.
    residual : ndarray of bool
        True for lines made only by residual gas.
    """

    _columns = _LINE_COLUMNS
    _formats = {"mass_u": ".6f", "m_over_q": ".6f", "a_over_q": ".4f", "intensity": ".4g"}

    @classmethod
    def _from_core(cls, d: Mapping[str, Any]) -> LineList:
        self = cls.__new__(cls)
        self._set_lines(d)
        return self

    def _core_columns(self) -> tuple[list[int], list[int], list[int], list[float], list[bool], list[str]]:
        return (
            self.z.tolist(),
            self.mass_number.tolist(),
            self.charge.tolist(),
            self.intensity.tolist(),
            self.residual.tolist(),
            [str(s) for s in self.isotope],
        )

    def _title(self) -> str:
        return f"LineList: {len(self)} lines"

    def select(self, mask: Any) -> LineList:
        """The lines where ``mask`` is true (a boolean array or index array).

        Examples
        --------
        >>> lines = aq_lines({"Ne": {1: 0.6, 2: 0.4}}, residual_gas={})
        >>> len(lines.select(lines.charge == 1))
        3
        """
        try:
            idx = np.arange(len(self))[np.asarray(mask)]
        except (IndexError, TypeError, ValueError) as exc:
            raise InvalidParameterError(f"invalid mask: {exc}") from None
        cols = self._core_columns()
        picked = tuple([c[i] for i in idx.tolist()] for c in cols)
        return LineList._from_core(_core_call(_core._rebuild_lines, picked))

    def plot(
        self,
        ax: Any | None = None,
        resolving_power: float | None = None,
        target: tuple[str, int] | None = None,
        shape: str = "gaussian",
        m_over_q_range: tuple[float, float] | None = None,
        search_fwhm: float = 3.0,
    ) -> Any:
        """Stick spectrum, with the peak spectrum at ``resolving_power`` drawn over it.

        The target (vermillion) and, when ``resolving_power`` is given, its interferers
        within ``search_fwhm`` target FWHM (blue) are drawn in colour and labelled; other
        lines are grey, residual-gas lines green. Peaks are drawn with height = intensity.

        Parameters
        ----------
        ax : matplotlib Axes, optional
            Where to draw; a new figure otherwise.
        resolving_power : float, optional
            R = (m/q)/FWHM; adds the summed peak profile.
        target : (str, int), optional
            Isotope and charge to mark, e.g. ``("84Kr", 26)``; the view zooms onto it.
        shape : {"gaussian", "triangular", "rectangular"}
            Peak shape.
        m_over_q_range : (float, float), optional
            m/q range (u/e) to show.
        search_fwhm : float
            Distance (in target FWHM) within which lines count as interferers.

        Returns
        -------
        matplotlib Axes

        Examples
        --------
        >>> import matplotlib
        >>> matplotlib.use("Agg")
        >>> lines = aq_lines({"Ne": {1: 1.0}}, residual_gas={"Ar": 1.0})
        >>> ax = lines.plot(resolving_power=2000, target=("20Ne", 1))
        >>> ax.get_xlabel()
        'm/q (u/e)'
        """
        plt = require_pyplot()
        interferers: set[str] = set()
        centre = None
        report = None
        if target is not None:
            report = overlaps(
                self,
                target,
                resolving_power if resolving_power is not None else 1e3,
                shape,
                search_fwhm=as_float("search_fwhm", search_fwhm),
            )
            centre = report.target_m_over_q
            if resolving_power is not None:
                interferers = {str(s) for s in report.label}
        if m_over_q_range is not None:
            lo, hi = (as_float("m_over_q_range", v) for v in m_over_q_range)
        elif centre is not None:
            half = (
                (1.5 * search_fwhm * centre / resolving_power)
                if resolving_power is not None
                else 0.01 * centre
            )
            lo, hi = centre - half, centre + half
        elif len(self):
            pad = 0.02 * (self.m_over_q.max() - self.m_over_q.min()) + 0.01 * self.m_over_q.max()
            lo, hi = self.m_over_q.min() - pad, self.m_over_q.max() + pad
        else:
            lo, hi = 0.0, 1.0
        if ax is None:
            _, ax = plt.subplots(figsize=(7.5, 4.0))
        visible = (self.m_over_q >= lo) & (self.m_over_q <= hi)
        target_label = report.target if report is not None else None
        kinds: dict[str, list[int]] = {"target": [], "interferer": [], "residual gas": [], "other": []}
        # Lines below 0.3 % of the tallest one in range would be drawn flat on the axis:
        # they are left out, so the legend names only classes that can be seen.
        tallest = float(self.intensity[visible].max()) if visible.any() else 0.0
        for i in np.flatnonzero(visible).tolist():
            name = str(self.label[i])
            if name != target_label and self.intensity[i] < 3e-3 * tallest:
                continue
            kind = (
                "target"
                if name == target_label
                else "interferer"
                if name in interferers
                else "residual gas"
                if self.residual[i]
                else "other"
            )
            kinds[kind].append(i)
        colours = {
            "target": _TARGET_COLOUR,
            "interferer": _INTERFERER_COLOUR,
            "residual gas": _RESIDUAL_COLOUR,
            "other": _OTHER_COLOUR,
        }
        profile_top: list[float] = []
        if resolving_power is not None and visible.any():
            r = as_float("resolving_power", resolving_power)
            near = (self.m_over_q >= lo - 10 * hi / r) & (self.m_over_q <= hi + 10 * hi / r)
            c, h = self.m_over_q[near], self.intensity[near]
            local = np.linspace(-4.0, 4.0, 161)
            x = np.unique(np.concatenate([np.linspace(lo, hi, 2001)] + [ci + local * ci / r for ci in c]))
            x = x[(x >= lo) & (x <= hi)]
            y = _core_call(_core._peak_profile, c.tolist(), h.tolist(), x.tolist(), r, shape)
            ax.plot(x, y, color="#000000", lw=0.8, alpha=0.6, label=f"peaks at R = {r:g}")
            profile_top = [float(np.max(y))] if len(y) else []
        for kind, idx in kinds.items():
            if idx:
                ax.vlines(
                    self.m_over_q[idx], 0.0, self.intensity[idx], color=colours[kind], lw=1.6, label=kind
                )
        marked = sorted(kinds["target"] + kinds["interferer"], key=lambda i: self.m_over_q[i])
        for k, i in enumerate(marked):
            # Alternate label heights so neighbouring lines keep readable labels.
            ax.annotate(
                _pretty(self.label[i]),
                (self.m_over_q[i], self.intensity[i]),
                textcoords="offset points",
                xytext=(0, 3 + 10 * (k % 2)),
                ha="center",
                fontsize=8,
                color=colours["target" if i in kinds["target"] else "interferer"],
            )
        top = max([float(self.intensity[visible].max()) if visible.any() else 1.0] + profile_top)
        ax.set_xlim(lo, hi)
        ax.set_ylim(0.0, 1.25 * top)
        ax.set_xlabel("m/q (u/e)")
        ax.set_ylabel("relative intensity")
        if ax.get_legend_handles_labels()[0]:
            ax.legend(fontsize=8, frameon=False)
        if report is not None:
            ax.set_title(f"neighbourhood of {report.target}", fontsize=10)
        return ax


def _pretty(label: Any) -> str:
    """'84Kr26+' → mathtext with the mass number and charge as superscripts."""
    s = str(label)
    digits = len(s) - len(s.lstrip("0123456789"))
    rest = s[digits:]
    letters = len(rest) - len(rest.lstrip("ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz"))
    return f"$^{{{s[:digits]}}}${rest[:letters]}$^{{{rest[letters:]}}}$"


def _as_lines(lines: LineList | Species, amounts: Any, residual_gas: Any) -> LineList:
    if isinstance(lines, LineList):
        return lines
    if isinstance(lines, Mapping):
        return aq_lines(lines, amounts=amounts, residual_gas=residual_gas)
    raise InvalidParameterError(
        f"invalid lines = {lines!r}: give a LineList from aq_lines() or a species dict"
    )


def _target(target: Any) -> tuple[str, int]:
    if not (isinstance(target, tuple) and len(target) == 2):
        raise InvalidParameterError(f'invalid target = {target!r}: give (isotope, charge), e.g. ("84Kr", 26)')
    return _spec("target isotope", target[0]), as_int("target charge", target[1])


def _shape(shape: Any) -> str:
    if not isinstance(shape, str):
        raise InvalidParameterError(
            f'invalid shape = {shape!r}: one of "gaussian", "triangular", "rectangular"'
        )
    return shape


@contextlib.contextmanager
def _result_columns(cls: str, made_by: str) -> Iterator[None]:
    """Malformed column tables given to a result class become one documented error."""
    try:
        yield
    except (KeyError, IndexError, TypeError, ValueError, AttributeError) as exc:
        raise ArgumentTypeError(
            f"invalid d for {cls}: {type(exc).__name__} ({str(exc)[:60]}); {cls} objects are "
            f"results: get one from {made_by}"
        ) from None


class OverlapReport(_LineColumns):
    """The lines near a target ion at one resolving power; made by :func:`overlaps`.

    Attributes
    ----------
    target : str
        Target ion, e.g. ``"84Kr26+"``.
    target_isotope : str
    target_charge : int
    target_m_over_q, target_a_over_q : float
        Target's m/q (u/e) and A/q.
    target_intensity : float
    resolving_power : float
    shape : str
    fwhm : float
        Target's FWHM (u/e) = m/q / R.
    window : (float, float)
        Acceptance window on the m/q axis (u/e).
    target_window_fraction : float
        Share of the target's own peak inside the window.
    purity : float
        Target's intensity in the window over that of every line in the window.
    label, isotope, z, mass_number, charge, mass_u, m_over_q, a_over_q, intensity, residual : ndarray
        The interfering lines (as in :class:`LineList`), most contaminating first.
    delta_m_over_q : ndarray
        Interferer's m/q minus the target's (u/e).
    separation_fwhm : ndarray
        |Δ(m/q)| in target FWHM.
    window_fraction : ndarray
        Share of each interferer's peak inside the target's window.
    contamination : ndarray
        Interferer's intensity in the window relative to the target's own there.
    resolving_power_needed : ndarray
        (m/q)/|Δ(m/q)|: the resolving power at which the pair is one FWHM apart.
    """

    _columns = (
        "label",
        "m_over_q",
        "a_over_q",
        "intensity",
        "delta_m_over_q",
        "separation_fwhm",
        "window_fraction",
        "contamination",
        "resolving_power_needed",
        "residual",
    )
    _formats = {
        "m_over_q": ".6f",
        "a_over_q": ".4f",
        "intensity": ".4g",
        "delta_m_over_q": "+.3e",
        "separation_fwhm": ".3f",
        "window_fraction": ".3g",
        "contamination": ".3g",
        "resolving_power_needed": ".4g",
    }

    def __init__(self, d: Mapping[str, Any], lines: LineList, resolving_power: float) -> None:
        with _result_columns("OverlapReport", "overlaps()"):
            self._fill(d, lines, resolving_power)

    def _fill(self, d: Mapping[str, Any], lines: LineList, resolving_power: float) -> None:
        self._set_lines(d)
        self.target = str(d["target_label"][0])
        self.target_isotope = str(d["target_isotope"][0])
        self.target_charge = int(d["target_charge"][0])
        self.target_m_over_q = float(d["target_m_over_q"][0])
        self.target_a_over_q = float(d["target_a_over_q"][0])
        self.target_intensity = float(d["target_intensity"][0])
        self.resolving_power = resolving_power
        self.shape = str(d["shape"])
        self.fwhm = float(d["fwhm"])
        self.window = (float(d["window"][0]), float(d["window"][1]))
        self.target_window_fraction = float(d["target_window_fraction"])
        self.purity = float(d["purity"])
        self.delta_m_over_q = np.asarray(d["delta_m_over_q"], dtype=np.float64)
        self.separation_fwhm = np.asarray(d["separation_fwhm"], dtype=np.float64)
        self.window_fraction = np.asarray(d["window_fraction"], dtype=np.float64)
        self.contamination = np.asarray(d["contamination"], dtype=np.float64)
        self.resolving_power_needed = np.asarray(d["resolving_power_needed"], dtype=np.float64)
        self.lines = lines

    @property
    def max_resolving_power_needed(self) -> float:
        """Resolving power that puts every listed interferer at least one FWHM away (0 if none)."""
        return float(self.resolving_power_needed.max()) if len(self) else 0.0

    def _title(self) -> str:
        return (
            f"OverlapReport: {self.target} at m/q {self.target_m_over_q:.6f} u/e, "
            f"R = {self.resolving_power:g} ({self.shape}), FWHM {self.fwhm:.3g} u/e, "
            f"purity {self.purity:.4g}, {len(self)} interferers"
        )

    def plot(self, ax: Any | None = None) -> Any:
        """The target's neighbourhood: :meth:`LineList.plot` at this report's settings.

        Returns
        -------
        matplotlib Axes
        """
        return self.lines.plot(
            ax=ax,
            resolving_power=self.resolving_power,
            target=(self.target_isotope, self.target_charge),
            shape=self.shape,
        )


def overlaps(
    lines: LineList | Species,
    target: tuple[str, int] = ("84Kr", 26),
    resolving_power: float = 200.0,
    shape: str = "gaussian",
    window_fwhm: float = 1.0,
    search_fwhm: float = 3.0,
    amounts: Mapping[str, float] | None = None,
    residual_gas: Mapping[str, Any] | None = None,
) -> OverlapReport:
    """Lines that fall on a target ion at a resolving power, and what it takes to split them.

    The acceptance window is ±``window_fwhm``·FWHM/2 around the target's m/q; each line's
    peak has FWHM = its m/q / R. For every other line within ``search_fwhm`` target FWHM:
    the share of its peak area inside the window (Gaussian: ½[erf(b) − erf(a)] with
    a, b = (window edge − centre)/(σ√2), σ = FWHM/(2√(2 ln 2))), its contamination (its
    intensity in the window relative to the target's own there) and the resolving power
    that would put it one FWHM away, (m/q)/|Δ(m/q)|.

    Parameters
    ----------
    lines : LineList or dict
        From :func:`aq_lines`, or a species dict passed to it with ``amounts`` and
        ``residual_gas``.
    target : (str, int)
        Isotope and charge, e.g. ``("84Kr", 26)``.
    resolving_power : float
        R = (m/q)/FWHM, > 0.
    shape : {"gaussian", "triangular", "rectangular"}
        Peak shape (a triangle's base is 2 FWHM; a rectangle is FWHM wide).
    window_fwhm : float
        Full width of the acceptance window in target FWHM (1 = ±FWHM/2).
    search_fwhm : float
        How far from the target (in target FWHM) to list interferers.
    amounts, residual_gas : dict, optional
        Passed to :func:`aq_lines` when ``lines`` is a species dict.

    Returns
    -------
    OverlapReport

    Examples
    --------
    >>> lines = aq_lines({"Ne": {1: 1.0}}, residual_gas={"Ar": 1.0})
    >>> report = overlaps(lines, target=("20Ne", 1), resolving_power=500)
    >>> [str(s) for s in report.label]
    ['40Ar2+']
    >>> round(float(report.resolving_power_needed[0]))  # 40Ar2+ lies 1/1777 below 20Ne+
    1777
    >>> round(report.purity, 3)
    0.757
    """
    lines = _as_lines(lines, amounts, residual_gas)
    iso, charge = _target(target)
    r = as_float("resolving_power", resolving_power)
    d = _core_call(
        _core._overlaps,
        lines._core_columns(),
        iso,
        charge,
        r,
        _shape(shape),
        as_float("window_fwhm", window_fwhm),
        as_float("search_fwhm", search_fwhm),
    )
    return OverlapReport(d, lines, r)


class ChargeStateRanking(_LineColumns):
    """Charge states of a target isotope ranked by produced fraction × purity; made by
    :func:`clean_charge_states`.

    Attributes
    ----------
    target_isotope : str
        The target isotope as given.
    charge : ndarray of int
        Charge states, best first.
    label : ndarray of str
    m_over_q, a_over_q, intensity : ndarray of float
    fraction : ndarray
        Share of the isotope's ions (all charges in the line list) in this charge state.
    purity : ndarray
        The line's intensity in its window over that of every line in the window.
    score : ndarray
        fraction × purity.
    window_low, window_high : ndarray
        Acceptance window on the m/q axis (u/e).
    main_contaminant : list of str or None
        The line bringing most foreign intensity into the window.
    main_contaminant_share : ndarray
        Its share of the window's content.
    """

    _columns = (
        "charge",
        "label",
        "m_over_q",
        "a_over_q",
        "fraction",
        "purity",
        "score",
        "main_contaminant",
        "main_contaminant_share",
    )
    _formats = {
        "m_over_q": ".6f",
        "a_over_q": ".4f",
        "fraction": ".4f",
        "purity": ".4f",
        "score": ".4f",
        "main_contaminant_share": ".3g",
    }

    def __init__(self, d: Mapping[str, Any], isotope: str) -> None:
        with _result_columns("ChargeStateRanking", "clean_charge_states()"):
            self._fill(d, isotope)

    def _fill(self, d: Mapping[str, Any], isotope: str) -> None:
        self._set_lines(d)
        self.target_isotope = isotope
        self.fraction = np.asarray(d["fraction"], dtype=np.float64)
        self.purity = np.asarray(d["purity"], dtype=np.float64)
        self.score = np.asarray(d["score"], dtype=np.float64)
        self.window_low = np.asarray(d["window_low"], dtype=np.float64)
        self.window_high = np.asarray(d["window_high"], dtype=np.float64)
        self.main_contaminant = list(d["main_contaminant"])
        self.main_contaminant_share = np.asarray(d["main_contaminant_share"], dtype=np.float64)

    def _table_columns(self) -> dict[str, Any]:
        cols = super()._table_columns()
        cols["main_contaminant"] = np.array(self.main_contaminant, dtype=object)
        return cols

    @property
    def best(self) -> int:
        """The recommended charge state (highest score)."""
        return int(self.charge[0])

    def _title(self) -> str:
        return f"ChargeStateRanking of {self.target_isotope}: best {self.best}+"


def clean_charge_states(
    lines: LineList | Species,
    target_isotope: str,
    aq_window: float | None = None,
    relative_window: float | None = None,
    resolving_power: float | None = None,
    shape: str = "gaussian",
    window_fwhm: float = 1.0,
    amounts: Mapping[str, float] | None = None,
    residual_gas: Mapping[str, Any] | None = None,
) -> ChargeStateRanking:
    """Rank the charge states of a target isotope by produced fraction × purity.

    Each charge state of ``target_isotope`` in the line list gets an acceptance window
    centred on its m/q; purity is its intensity in the window over the intensity of every
    line there, fraction its share of the isotope's ions. Without ``resolving_power``
    lines are sticks (in the window or not); with it each line contributes the part of its
    peak inside the window.

    Parameters
    ----------
    lines : LineList or dict
        From :func:`aq_lines`, or a species dict passed to it with ``amounts`` and
        ``residual_gas``.
    target_isotope : str
        E.g. ``"84Kr"``.
    aq_window : float, optional
        Half-width of the window in A/q units: ±``aq_window`` u/e around the candidate's
        m/q (the window is applied with exact masses).
    relative_window : float, optional
        Half-width relative to the candidate's m/q (0.005 = ±0.5 %).
    resolving_power : float, optional
        R = (m/q)/FWHM; gives the lines peak shapes. Without ``aq_window`` and
        ``relative_window`` the window is ±``window_fwhm``·FWHM/2.
    shape : {"gaussian", "triangular", "rectangular"}
        Peak shape when ``resolving_power`` is given.
    window_fwhm : float
        Window full width in FWHM, used when neither other window is given.
    amounts, residual_gas : dict, optional
        Passed to :func:`aq_lines` when ``lines`` is a species dict.

    Returns
    -------
    ChargeStateRanking
        Best charge state first; ``.best`` is its charge.

    Examples
    --------
    >>> o = {3: 0.3, 4: 0.4, 5: 0.3}
    >>> ranking = clean_charge_states({"16O": o}, "16O", aq_window=0.01, residual_gas={"12C": {3: 1.0}})
    >>> ranking.charge.tolist()
    [3, 5, 4]
    >>> ranking.main_contaminant[2]
    '12C3+'
    >>> clean_charge_states({"16O": o}, "16O", resolving_power=1e5, residual_gas={"12C": {3: 1.0}}).best
    4
    """
    lines = _as_lines(lines, amounts, residual_gas)
    iso = _spec("target_isotope", target_isotope)
    if aq_window is not None and relative_window is not None:
        raise InvalidParameterError("give aq_window or relative_window, not both")
    if aq_window is not None:
        kind, value = "aq", as_float("aq_window", aq_window)
    elif relative_window is not None:
        kind, value = "relative", as_float("relative_window", relative_window)
    elif resolving_power is not None:
        kind, value = "fwhm", as_float("window_fwhm", window_fwhm)
    else:
        raise InvalidParameterError(
            "no acceptance window: give aq_window, relative_window or resolving_power"
        )
    r = None if resolving_power is None else as_float("resolving_power", resolving_power)
    d = _core_call(_core._clean_charge_states, lines._core_columns(), iso, kind, value, r, _shape(shape))
    return ChargeStateRanking(d, iso)
