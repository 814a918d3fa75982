"""Random calls into every public callable of chargecast, and how to judge their outcome.

One call is made from a ``random.Random``: the callable (a name of ``chargecast.__all__``,
or a method of a valid object built from a fixed recipe), then its arguments, each either
plausible for the parameter's name (``energies_ev`` gets a short array of positive energies,
``element`` an element symbol) or odd (NaN, ±inf, subnormals, 1e308, huge integers,
booleans, strings, None, complex, object and empty arrays, numpy scalars). The same
generator serves the hypothesis tests (``tests/python/test_fuzz.py``, driven by
``st.randoms()``) and the long run (``tests/fuzz/run.py``, seeded per call so a call that
aborts its worker can be rebuilt and shown).

Outcomes (:func:`judge`):

* ``ok`` -- returned; every number reachable in the result is checked (no NaN; fractions
  finite and within [0, 1]);
* ``documented`` -- a ``ChargecastError`` subclass, or a ``TypeError`` that names one of
  the callable's parameters;
* ``undocumented`` -- any other exception (``KeyboardInterrupt`` included);
* ``bad`` -- accepted, but the result holds NaN or a fraction outside [0, 1].
"""

from __future__ import annotations

import inspect
import math
import random
import re
import warnings
from typing import Any, Callable

import numpy as np

import chargecast as cc

SYMBOLS = ["H", "He", "C", "O", "Ne", "Ar", "Kr", "Xe", "Au", "Bi", "U", "Og", "Lr"]
# The quick (CI) runs leave out the heaviest elements, whose photon calls are known to be
# slow (issue 15, item 9); the long run keeps them.
QUICK = False
HEAVY = ("Au", "Bi", "U", "Og", "Lr", 92)
ISOTOPES = ["40Ar", "129Xe", "Xe-129", "238U", "22Ne", "Bi", "Ar", "12C"]
GASES = ["H2", "He", "N2", "O2", "CO", "CO2", "H2O", "CH4", "Ne", "Ar", "Kr", "Xe"]
# Parameters whose values are whole numbers (charges, counts) when plausible.
INTEGER_WORDS = ("charge", "points", "n_", "count", "mass_number", "z", "q", "index", "dpi")


def odd_value(rng: random.Random) -> Any:
    """A value no parameter should accept silently as something else."""
    pool: list[Callable[[], Any]] = [
        lambda: None,
        lambda: rng.choice([True, False]),
        lambda: rng.choice(["", "x", "Ar", "1e3", "nan", "☃", "a" * 300]),
        lambda: rng.choice([0, -1, 1, 2, 10**400, -(10**400), 2**63, 2**64 + 1]),
        lambda: rng.choice([math.nan, math.inf, -math.inf, 5e-324, 2.2e-308, 1e308, 1.8e308, -0.0, -1.0]),
        lambda: rng.choice([np.int64(18), np.float32(2.5), np.float64(1e3), np.bool_(True), np.uint8(7)]),
        lambda: np.array([]),
        lambda: np.array([[1.0, 2.0], [3.0, 4.0]]),
        lambda: np.array([1.0 + 1.0j, 2.0]),
        lambda: np.array(["a", "b"]),
        lambda: np.array([1.0, None], dtype=object),
        lambda: np.array([math.nan, 1.0, math.inf]),
        lambda: [rng.uniform(-1e3, 1e3) for _ in range(rng.randint(0, 5))],
        lambda: {},
        lambda: {"H2": rng.choice([1e-9, -1.0, math.nan, "x"]), rng.choice(["XX", "", "h2"]): 1.0},
        lambda: (1, 2),
        lambda: object(),
        lambda: b"bytes",
    ]
    return rng.choice(pool)()


def _positive(rng: random.Random, lo: float = -6.0, hi: float = 6.0) -> float:
    return 10 ** rng.uniform(lo, hi)


def plausible_value(rng: random.Random, name: str) -> Any:
    """A value of the right kind for a parameter called ``name`` (possibly out of range)."""
    n = name.lower()
    plural = n.endswith("s") and not n.endswith(("_s", "_pa", "ss", "_cm2_s", "_per_s"))
    if n in ("element", "symbol", "value", "key", "species", "el"):
        pool = SYMBOLS + [18, 54, 92, np.int64(18), "xenon", "Qq"]
        return rng.choice([s for s in pool if not (QUICK and s in HEAVY)])
    if "isotope" in n:
        return rng.choice(ISOTOPES)
    if n in ("beam", "electron_beam"):
        return cc.ElectronBeam(rng.uniform(100, 3e4), _positive(rng, -3, 0), radius_m=_positive(rng, -5, -3))
    if "gas" in n or n.endswith("_pa") and n.startswith("residual"):
        return {rng.choice(GASES): _positive(rng, -11, -6) for _ in range(rng.randint(0, 3))}
    if n in ("rates", "rates_per_s", "matrix") or n.startswith("rate"):
        k = rng.randint(1, 6)
        return np.array(
            [
                [0.0 if i == j else _positive(rng, -3, 3) * (rng.random() < 0.5) for j in range(k)]
                for i in range(k)
            ]
        )
    if "fraction" in n or n == "initial" or n.startswith("population"):
        k = rng.randint(1, 8)
        v = np.array([rng.random() for _ in range(k)])
        return v / v.sum()
    if n in ("path", "file", "filename"):
        return rng.choice(["demo", "reference", str(cc.bundled_scenarios()["demo"]), "nope.toml"])
    if n == "text":
        return mutate_scenario(rng, rng.choice(list(cc.bundled_scenarios().values())).read_text("utf-8"))
    if n == "processes":
        return rng.sample(
            ["ionization", "radiative_recombination", "charge_exchange", "multiple_ionization"],
            rng.randint(0, 3),
        )
    if plural:
        k = rng.randint(0, 40)
        if any(w in n for w in ("charge", "q")):
            return [rng.randint(0, 60) for _ in range(k)]
        return np.sort(np.array([_positive(rng) for _ in range(k)]))
    if any(w == n or n.startswith(w) or n.endswith(w) for w in INTEGER_WORDS):
        return rng.choice([rng.randint(0, 100), np.int64(rng.randint(0, 60))])
    if n.endswith(("_ev", "_s", "_a", "_m", "_t", "_pa", "_k", "_cm2", "_cm3", "_per_s", "_a_cm2")):
        return _positive(rng)
    if n in ("scale", "peak_shape", "shape", "kind", "method"):
        return rng.choice(["log", "linear", "gaussian", "triangular", "rectangular", "x"])
    return rng.choice([_positive(rng, -3, 3), rng.random(), rng.randint(0, 10), "Ar"])


def argument(rng: random.Random, name: str) -> Any:
    return odd_value(rng) if rng.random() < 0.25 else plausible_value(rng, name)


def mutate_scenario(rng: random.Random, text: str) -> str:
    """A scenario text with a few random edits: characters, lines, numbers, values."""
    lines = text.splitlines()
    for _ in range(rng.randint(1, 4)):
        if not lines:
            lines = [""]
        i = rng.randrange(len(lines))
        op = rng.randrange(9)
        line = lines[i]
        if op == 0:
            del lines[i]
        elif op == 1:
            lines.insert(i, rng.choice(lines))
        elif op == 2 and "=" in line:
            key = line.split("=")[0]
            value = rng.choice(
                [
                    "nan",
                    "inf",
                    "-inf",
                    "5e-324",
                    "1e308",
                    "-1",
                    "0",
                    '"x"',
                    "true",
                    "[]",
                    "{}",
                    "[1, 2]",
                    '"' + "a" * 500 + '"',
                    "[" + "1.0, " * 2000 + "1.0]",
                    "9" * 30,
                    "1e-300",
                    "2",
                    "100000",
                    "100001",
                    '"log"',
                ]
            )
            lines[i] = f"{key}= {value}"
        elif op == 3 and line:
            j = rng.randrange(len(line))
            lines[i] = line[:j] + rng.choice("[]{}=\"'#.,-+0e\n\t\\x☃") + line[j + 1 :]
        elif op == 4 and line:
            j = rng.randrange(len(line))
            lines[i] = line[:j] + line[j + 1 :]
        elif op == 5:
            lines.insert(
                i,
                rng.choice(
                    [
                        "[target]",
                        "[beam_trap]",
                        "[[species]]",
                        "[photon_beam]",
                        "[time]",
                        "[energy_scan]",
                        "[separator]",
                        "[residual_gas_pa]",
                        "unknown = 1",
                        'name = "Ne"',
                        "points = 50",
                        "charge = 200",
                    ]
                ),
            )
        elif op == 6:
            lines = lines[: rng.randrange(len(lines) + 1)]
        elif op == 7:
            rng.shuffle(lines)
        else:
            lines[i] = line.replace(".", "", 1)
    return "\n".join(lines) + "\n"


# --- what is called --------------------------------------------------------------------------


def _receivers() -> dict[str, Callable[[], Any]]:
    """Recipes of valid objects whose methods are fuzzed."""
    beam = lambda: cc.ElectronBeam(5000.0, 0.1, radius_m=50e-6)  # noqa: E731
    trap = lambda: cc.BeamTrap(beam(), 0.5, residual_gas_pa={"H2": 1e-9}, ion_temperature_ev=30.0)  # noqa: E731
    return {
        "ElectronBeam": beam,
        "BeamTrap": trap,
        "Evolution": lambda: trap().evolve("Ne", np.geomspace(1e-4, 1.0, 20)),
        "Element": lambda: cc.element("Ar"),
        "Ion": lambda: cc.element("Ar").ion(8),
        "Scenario": lambda: cc.load_scenario("demo"),
    }


_CACHE: dict[str, Any] = {}


def receiver(name: str) -> Any:
    if name not in _CACHE:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            _CACHE[name] = _receivers()[name]()
    return _CACHE[name]


def public_callables() -> list[str]:
    """Every callable of ``chargecast.__all__`` except the exception classes."""
    out = []
    for name in cc.__all__:
        obj = getattr(cc, name)
        if not callable(obj) or (isinstance(obj, type) and issubclass(obj, BaseException)):
            continue
        out.append(name)
    return out


def methods(name: str) -> list[str]:
    obj = receiver(name)
    return [m for m in dir(obj) if not m.startswith("_") and callable(getattr(obj, m, None))]


def parameters(f: Any) -> list[inspect.Parameter] | None:
    try:
        return [p for p in inspect.signature(f).parameters.values() if p.name not in ("self", "cls")]
    except (TypeError, ValueError):
        return None


SKIP_METHODS = {"plot", "save_plots", "to_pandas", "run"}  # figures/pandas: slow and not core


class Call:
    """One call: what, with which arguments; ``run`` performs it."""

    def __init__(self, label: str, f: Any, args: list[Any], kwargs: dict[str, Any], names: list[str]):
        self.label, self.f, self.args, self.kwargs, self.names = label, f, args, kwargs, names

    def __repr__(self) -> str:
        def short(v: Any) -> str:
            r = repr(v)
            return r if len(r) <= 60 else r[:57] + "..."

        parts = [short(a) for a in self.args] + [f"{k}={short(v)}" for k, v in self.kwargs.items()]
        return f"{self.label}({', '.join(parts)})"


def plan_mutated_scenario(text: str) -> Any:
    """Parse a (mutated) scenario file and run its plan: the scenario mutation run."""
    return cc.Scenario.from_text(text).run()


def make_call(rng: random.Random, name: str | None = None) -> Call:
    """A random call, of the public callable ``name`` if given (else of anything);
    ``name="plan_mutated_scenario"`` parses and runs a mutated bundled scenario."""
    if name == "plan_mutated_scenario":
        text = mutate_scenario(rng, rng.choice(list(cc.bundled_scenarios().values())).read_text("utf-8"))
        return Call(name, plan_mutated_scenario, [text], {}, ["text"])
    if name is None and rng.random() < 0.3:
        recv = rng.choice(sorted(_receivers()))
        meths = [m for m in methods(recv) if m not in SKIP_METHODS]
        meth = rng.choice(meths)
        f = getattr(receiver(recv), meth)
        label = f"{recv}.{meth}"
    else:
        name = name or rng.choice(public_callables())
        f = getattr(cc, name)
        label = name
    params = parameters(f)
    args: list[Any] = []
    kwargs: dict[str, Any] = {}
    if params is None:
        args = [odd_value(rng) for _ in range(rng.randint(0, 3))]
        return Call(label, f, args, kwargs, [])
    for p in params:
        if p.kind in (p.VAR_POSITIONAL, p.VAR_KEYWORD):
            continue
        required = p.default is inspect.Parameter.empty
        if not required and rng.random() < 0.6:
            continue
        value = argument(rng, p.name)
        if p.kind is p.POSITIONAL_ONLY or (p.kind is p.POSITIONAL_OR_KEYWORD and required and not kwargs):
            args.append(value)
        else:
            kwargs[p.name] = value
    if label == "set_memory_limit_bytes":  # keep the process usable: only valid raises
        args = [rng.choice([2 << 30, 4 << 30, 10, -1, 2**70, "x"])]
        kwargs = {}
    return Call(label, f, args, kwargs, [p.name for p in params])


# --- judging the outcome -----------------------------------------------------------------------


def _bad_numbers(value: Any, name: str, depth: int = 0) -> str | None:
    """A description of the first NaN (or fraction outside [0, 1]) reachable in ``value``."""
    if name.endswith(".lines"):  # a scenario's source line of each key, not values
        return None
    fraction = "fraction" in name.lower()
    if isinstance(value, (bool, np.bool_)):
        return None
    if isinstance(value, (float, int, np.floating, np.integer)):
        value = np.asarray(value)
    if isinstance(value, np.ndarray):
        if value.dtype.kind not in "fiuc" or value.size == 0:
            return None
        v = value.astype(complex if value.dtype.kind == "c" else float)
        if np.isnan(v).any():
            return f"{name}: NaN"
        if fraction and (not np.isfinite(v).all() or (v.real < -1e-12).any() or (v.real > 1 + 1e-9).any()):
            return f"{name}: fraction outside [0, 1] (min {v.real.min():.3g}, max {v.real.max():.3g})"
        return None
    if depth >= 2:
        return None
    if isinstance(value, dict):
        for k, v in list(value.items())[:200]:
            bad = _bad_numbers(v, f"{name}[{k!r}]", depth + 1)
            if bad:
                return bad
        return None
    if isinstance(value, (list, tuple)):
        for i, v in enumerate(value[:200]):
            bad = _bad_numbers(v, f"{name}[{i}]" if not fraction else name, depth + 1)
            if bad:
                return bad
        return None
    if type(value).__module__.startswith("chargecast"):
        for attr in dir(value):
            if attr.startswith("_"):
                continue
            try:
                v = getattr(value, attr)
            except Exception:  # noqa: BLE001 - a getter that raises is judged by its own call
                continue
            if callable(v):
                continue
            bad = _bad_numbers(v, f"{name}.{attr}", depth + 1)
            if bad:
                return bad
    return None


def judge(call: Call) -> tuple[str, str]:
    """Perform ``call``; (outcome, detail) with outcome one of ok, documented, undocumented, bad."""
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            result = call.f(*call.args, **call.kwargs)
            bad = _bad_numbers(result, "result")
    except cc.ChargecastError:
        return "documented", ""
    except TypeError as exc:
        msg = str(exc)
        # The parameter's name as a word ("argument 'energy_ev'", "energies_ev: must be …").
        if not call.names or any(re.search(rf"(?<![\w]){re.escape(n)}(?![\w])", msg) for n in call.names):
            return "documented", ""
        return "undocumented", f"TypeError: {msg[:200]}"
    except BaseException as exc:  # noqa: BLE001 - KeyboardInterrupt included: it is never documented
        return "undocumented", f"{type(exc).__name__}: {str(exc)[:200]}"
    finally:
        if call.label == "set_memory_limit_bytes":
            cc.set_memory_limit_bytes(2 << 30)
    if bad:
        return "bad", bad
    return "ok", ""
