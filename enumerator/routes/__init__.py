"""Substitution routes: which isomer forms when one ligand replaces another,
the network of every replacement between two compositions, and the orders
of addition that reach a target isomer.

The package follows the data:

* :mod:`enumerator.routes.keys` - decorations and canonical keys up to symmetry;
* :mod:`enumerator.routes.naming` - formulas with descriptors, and names of products;
* :mod:`enumerator.routes.space` - the formula space between start and target;
* :mod:`enumerator.routes.prediction` - one substitution step (:func:`predict`, :func:`predict_step`);
* :mod:`enumerator.routes.network` - the substitution network as data (:func:`build_network`);
* :mod:`enumerator.routes.planner` - the route planner (:func:`plan_routes`).

The rule sets that pick the replaced site are data under
``rules/substitution/``, read by :mod:`enumerator.rules.substitution`
(re-exported here).  Results are frozen; ``to_dict()`` gives each one's JSON
document and :mod:`enumerator.render.routes` / :mod:`enumerator.render.network`
draw them.

>>> plan = plan_routes("[Pt(NH3)4]2+", "trans-[PtCl2(NH3)2]")
>>> [r.order for r in plan.reaching]
[('Cl', 'Cl')]
"""

from enumerator.routes.keys import (
    Decoration,
    Placement,
    canonical_key,
    decoration,
    enumerate_isomers_cached,
    isomer_index,
    replace_site,
)
from enumerator.routes.naming import everyday_prefix, name_isomer, parse_species, resolve_species
from enumerator.routes.network import Network, build_network, node_id
from enumerator.routes.planner import MAX_ROUTES, Route, RoutePlan, Step, plan_routes
from enumerator.routes.prediction import (
    Prediction,
    Product,
    SiteChoice,
    predict,
    predict_in_space,
    predict_step,
    product_of,
)
from enumerator.routes.space import Endpoints, Space, Species, is_abstract, prepare_endpoints, safety_lines
from enumerator.rules.substitution import SubstitutionRules, choose_rule_set, load_substitution_rules

__all__ = [
    # rule sets (enumerator.rules.substitution)
    "SubstitutionRules",
    "load_substitution_rules",
    "choose_rule_set",
    # keys
    "Placement",
    "Decoration",
    "decoration",
    "canonical_key",
    "replace_site",
    "enumerate_isomers_cached",
    "isomer_index",
    # naming
    "parse_species",
    "resolve_species",
    "everyday_prefix",
    "name_isomer",
    # space
    "Species",
    "Space",
    "Endpoints",
    "prepare_endpoints",
    "is_abstract",
    "safety_lines",
    # one step
    "Product",
    "SiteChoice",
    "Prediction",
    "product_of",
    "predict_in_space",
    "predict",
    "predict_step",
    # network
    "Network",
    "build_network",
    "node_id",
    # planner
    "Step",
    "Route",
    "RoutePlan",
    "plan_routes",
    "MAX_ROUTES",
]
