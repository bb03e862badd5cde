"""The route planner: which orders of addition lead from a start isomer to a target isomer.

The ligands the target has in excess of the start must enter; every distinct
order of adding them (lexicographic in the formula's ligand order) is
followed step by step, carrying on the predicted major product
(:func:`~enumerator.routes.prediction.predict_in_space`) under one
substitution rule set.  At each step the ligands still in excess of the
target may leave.  An order reaches the target when its last major product
is the target's geometric isomer; an undecided step ends the order.

>>> plan = plan_routes("[PtCl4]2-", "cis-[PtCl2(NH3)2]")
>>> plan.rules.name, [r.order for r in plan.reaching]
('trans-effect', [('NH3', 'NH3')])
>>> plan.reaching[0].steps[-1].product.label()
'cis-[PtCl2(NH3)2] (isomer 1, C2v)'
"""

from __future__ import annotations

from collections.abc import Iterator, Mapping, Sequence
from typing import TYPE_CHECKING, Any

from enumerator.errors import CapacityError
from enumerator.frozen import frozen_dataclass
from enumerator.isomers.enumeration import Isomer
from enumerator.routes.keys import enumerate_isomers_cached
from enumerator.routes.naming import resolve_species
from enumerator.routes.prediction import Prediction, Product, predict_in_space, product_of
from enumerator.routes.space import Counts, Endpoints, Space, Species, prepare_endpoints, safety_lines
from enumerator.rules.ruleset import load_rules
from enumerator.rules.substitution import SubstitutionRules, choose_rule_set, load_substitution_rules
from enumerator.schema import SCHEMA_VERSION

if TYPE_CHECKING:
    import pandas as pd

__all__ = ["Step", "Route", "RoutePlan", "plan_routes", "MAX_ROUTES"]

#: The planner stops with a CapacityError beyond this many orders of addition.
MAX_ROUTES = 20000

_RACEMATE = (
    "a chiral product formed from an achiral precursor is the racemate;"
    " routes follow one enantiomer (the other mirrors it)"
)


@frozen_dataclass
class Step:
    """One addition of a route: the prediction and what it led to."""

    number: int
    entering: str
    prediction: Prediction

    @property
    def product(self) -> Product | None:
        """The major product of the step (None when the step is undecided)."""
        return self.prediction.major

    def to_dict(self) -> dict[str, Any]:
        """The step as it appears in a route's ``steps`` list."""
        return {"step": self.number, "entering": self.entering, **self.prediction.step_dict()}


@frozen_dataclass
class Route:
    """One order of addition followed through the predicted major products."""

    order: tuple[str, ...]
    steps: tuple[Step, ...]
    reaches_target: bool
    outcome: str

    def to_dict(self) -> dict[str, Any]:
        """The route as it appears in ``routes`` and ``other_orders``."""
        return {
            "order": list(self.order),
            "reaches_target": self.reaches_target,
            "outcome": self.outcome,
            "steps": [s.to_dict() for s in self.steps],
        }


@frozen_dataclass
class RoutePlan:
    """Every order of addition from the start isomer, and which of them end
    on the target isomer under the rule set."""

    geometry: str
    geometry_reason: str
    rules: SubstitutionRules
    rules_reason: str
    start: Product
    target: Product
    target_isomers: tuple[str, ...]
    entering: tuple[tuple[str, int], ...]
    leaving: tuple[tuple[str, int], ...]
    routes: tuple[Route, ...]
    notes: tuple[str, ...] = ()
    safety: tuple[str, ...] = ()

    @property
    def reaching(self) -> tuple[Route, ...]:
        """The routes that end on the target."""
        return tuple(r for r in self.routes if r.reaches_target)

    def to_dict(self) -> dict[str, Any]:
        """The JSON document of ``isosieve route`` (keys listed in the README)."""
        return {
            "schema_version": SCHEMA_VERSION,
            "geometry": self.geometry,
            "geometry_reason": self.geometry_reason,
            "rule_set": dict(self.rules.to_dict(), reason=self.rules_reason),
            "start": self.start.to_dict(),
            "target": dict(self.target.to_dict(), isomers=list(self.target_isomers)),
            "entering": dict(self.entering),
            "leaving": dict(self.leaving),
            "orders_searched": len(self.routes),
            "reached": bool(self.reaching),
            "routes": [r.to_dict() for r in self.reaching],
            "other_orders": [r.to_dict() for r in self.routes if not r.reaches_target],
            "notes": list(self.notes),
            "safety": list(self.safety),
        }

    def to_dataframe(self) -> pd.DataFrame:
        """One row per order of addition searched: the order, whether it reaches the target, the outcome, the
        number of steps, and the major product of the last step.

        Returns
        -------
        pandas.DataFrame
        """
        import pandas as pd

        rows = [
            {
                "order": " then ".join(r.order),
                "reaches target": r.reaches_target,
                "outcome": r.outcome,
                "steps": len(r.steps),
            }
            for r in self.routes
        ]
        return pd.DataFrame(rows, columns=["order", "reaches target", "outcome", "steps"])

    def __repr__(self) -> str:
        return (
            f"<RoutePlan {self.start.formula} -> {self.target.formula}: {len(self.reaching)} of "
            f"{len(self.routes)} order(s) reach the target>"
        )

    def _repr_html_(self) -> str:
        """The orders (:meth:`to_dataframe`) under a heading naming start and target, the cautions below."""
        import html

        head = f"<p><b>{html.escape(self.start.label())} to {html.escape(self.target.label())}</b></p>"
        tail = "".join(f"<p><b>Safety:</b> {html.escape(x)}</p>" for x in self.safety)
        return head + self.to_dataframe().to_html(index=False, escape=True) + tail


def _orders(entering: Mapping[str, int], names: Sequence[str]) -> Iterator[tuple[str, ...]]:
    """Distinct orders of a multiset, lexicographic by ``names`` order."""
    left = dict(entering)
    total = sum(left.values())
    acc: list[str] = []

    def rec() -> Iterator[tuple[str, ...]]:
        if len(acc) == total:
            yield tuple(acc)
            return
        for n in names:
            if left.get(n, 0) > 0:
                left[n] -= 1
                acc.append(n)
                yield from rec()
                acc.pop()
                left[n] += 1

    yield from rec()


@frozen_dataclass
class _Ends:
    """The start and target species and the isomers their descriptors name."""

    start: Species
    target: Species
    start_isomers: tuple[Isomer, ...]
    target_isomers: tuple[Isomer, ...]


def _resolve(ends: Endpoints) -> _Ends:
    if ends.target_descriptor is None:  # a target with several geometric isomers needs a descriptor: say so first
        t_iset = enumerate_isomers_cached(ends.target, ends.geometry)
        if t_iset.geometric_isomers > 1:
            resolve_species(t_iset, ends.target, None, role="target")
    s_sp = ends.space.species(ends.start_counts)
    t_sp = ends.space.species(ends.target_counts)
    s_isos = resolve_species(s_sp.isomer_set, ends.start, ends.start_descriptor, role="start")
    t_isos = resolve_species(t_sp.isomer_set, ends.target, ends.target_descriptor, role="target")
    return _Ends(s_sp, t_sp, tuple(s_isos), tuple(t_isos))


class _Walker:
    """Follows orders of addition through the predicted major products,
    memoising predictions by (composition, isomer, entering, leaving set)."""

    def __init__(self, ends: Endpoints, rules: SubstitutionRules, start: Species, isomer: Isomer):
        self.ends = ends
        self.rules = rules
        self.start = start
        self.isomer = isomer
        self.memo: dict[tuple[Counts, str, str, tuple[str, ...]], Prediction] = {}

    def _predict(self, sp: Species, iso: Isomer, entering: str, counts: Mapping[str, int]) -> Prediction:
        tc = self.ends.target_counts
        leaving = tuple(n for n in sorted(self.ends.leaving) if counts.get(n, 0) > tc.get(n, 0))
        key = (Space.signature(sp.composition), iso.id, entering, leaving)
        if key not in self.memo:
            self.memo[key] = predict_in_space(self.ends.space, sp, iso, entering, leaving, self.rules)
        return self.memo[key]

    def follow(self, order: tuple[str, ...], target: Species, target_number: int) -> Route:
        """The route of one order of addition."""
        counts = dict(self.ends.start_counts)
        sp, iso = self.start, self.isomer
        steps: list[Step] = []
        for k, entering in enumerate(order, start=1):
            p = self._predict(sp, iso, entering, counts)
            steps.append(Step(k, entering, p))
            if p.major is None:
                return Route(order, tuple(steps), False, f"step {k} (+{entering}) has no single major product")
            counts[p.major_sites[0].leaving] -= 1
            counts[entering] = counts.get(entering, 0) + 1
            sp = self.ends.space.species(counts)
            iso = sp.isomer_set.get(p.major.isomer)
        reached = iso.number == target_number and Space.signature(sp.composition) == Space.signature(target.composition)
        if reached:
            return Route(order, tuple(steps), True, "reaches the target")
        last = steps[-1].product
        assert last is not None  # an undecided step returned above
        return Route(order, tuple(steps), False, f"ends on {last.label()}, not the target")


def plan_routes(
    start_text: str,
    target_text: str,
    *,
    geometry: str | None = None,
    rule_set: str | None = None,
    rules: Sequence[str] = (),
) -> RoutePlan:
    """Follow every order of addition from START to TARGET's composition.

    Parameters
    ----------
    start_text : str
        A formula, with a descriptor when its composition has more than one isomer.
    target_text : str
        A formula with a descriptor (cis/trans/fac/mer or a configuration
        index) when its composition has more than one isomer.
    geometry : str, optional
        Polyhedral symbol (default: chosen from the start).
    rule_set : str, optional
        The substitution rule set by name (default: the applicable one of
        highest priority).
    rules : sequence of str
        User rule folders (``--rules DIR``).

    Returns
    -------
    RoutePlan
        Every order searched; ``reaching`` holds those that end on the target.

    Raises
    ------
    InputError
        The formulas, descriptors or rule set cannot be used.
    CapacityError
        More than :data:`MAX_ROUTES` orders of addition.
    """
    ruleset = load_rules(rules)
    ends = prepare_endpoints(start_text, target_text, geometry, ruleset)
    geo = ends.geometry
    found = _resolve(ends)
    s_iso = found.start_isomers[0]
    pointer = ruleset.geometry_note(geometry)  # an old spelling of a geometry symbol
    notes: list[str] = [pointer] if pointer else []
    if len(found.start_isomers) > 1:
        notes.append(
            f"the start is chiral; routes are followed from enantiomer {s_iso.id}"
            " (the other gives the mirror-image results)"
        )
    if geo.fluxional:
        notes.append(f"{geo.symbol} is fluxional: site-selective predictions on it are doubtful")
    ligands = sorted(set(ends.start_counts) | set(ends.target_counts))
    rules_obj, rules_reason = choose_rule_set(
        load_substitution_rules(ruleset), geo.symbol, ligands, ends.leaving, rule_set
    )
    if rules_obj.note:
        notes.append(rules_obj.note)
    walker = _Walker(ends, rules_obj, found.start, s_iso)
    target_number = found.target_isomers[0].number
    routes: list[Route] = []
    for order in _orders(ends.entering, [n for n in ends.space.order if n in ends.entering]):
        if len(routes) >= MAX_ROUTES:
            raise CapacityError(
                f"more than {MAX_ROUTES} orders of addition", "plan a shorter sequence (fewer ligands to add at once)"
            )
        route = walker.follow(order, found.target, target_number)
        routes.append(route)
        if any(st.product is not None and st.product.chiral for st in route.steps) and not any(
            "racemate" in n for n in notes
        ):
            notes.append(_RACEMATE)
    return RoutePlan(
        geometry=geo.symbol,
        geometry_reason=ends.geometry_reason,
        rules=rules_obj,
        rules_reason=rules_reason,
        start=product_of(found.start, s_iso.id),
        target=product_of(found.target, found.target_isomers[0].id),
        target_isomers=tuple(i.id for i in found.target_isomers),
        entering=tuple(sorted(ends.entering.items())),
        leaving=tuple(sorted(ends.leaving.items())),
        routes=tuple(routes),
        notes=tuple(notes),
        safety=safety_lines(ends.space.kinds.values()),
    )
