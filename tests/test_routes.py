"""Substitution networks, product prediction and the route planner.

Check values come from textbook syntheses and counting; each names its
source beside it.
"""

from __future__ import annotations

import json
from collections import Counter, defaultdict
from fractions import Fraction

import pytest

from enumerator.cli import main
from enumerator.errors import InputError
from enumerator.isomers.counting import burnside_counts
from enumerator.parse.abstract import parse_abstract
from enumerator.parse.formula import parse_formula
from enumerator.render.network import network_graphml, network_picture, network_svg, network_text
from enumerator.routes.keys import (
    canonical_key,
    decoration,
    enumerate_isomers_cached,
    isomer_index,
    replace_site,
)
from enumerator.routes.naming import parse_species, resolve_species
from enumerator.routes.network import build_network
from enumerator.routes.planner import plan_routes
from enumerator.routes.prediction import predict, predict_step
from enumerator.rules.ruleset import load_rules
from enumerator.rules.substitution import load_substitution_rules


def _geo_shares(p):
    """{prefix: share} over geometric isomers."""
    return {prod.prefix: share for prod, share in p.by_geometric_isomer()}


def _reaching_orders(plan):
    return sorted(r.order for r in plan.reaching)


def _write_rules(tmp_path, name, body):
    d = tmp_path / "substitution"
    d.mkdir(exist_ok=True)
    (d / f"{name}.toml").write_text(body, encoding="utf-8")
    return str(tmp_path)


LETTERS_TRANS = """
name = "letters-trans"
title = "letters ordered for a test"
source = "invented for a test (demo data)"
geometries = ["SP-4"]
labilises = "trans"
series = ["c", "a", "b"]
ties = "statistical"
"""

LETTERS_CIS = """
name = "letters-cis"
title = "b labilises the a groups cis to it (like L in M(CO)5L)"
source = "invented for a test, shaped like Atwood & Brown, J. Am. Chem. Soc. 98 (1976) 3160"
geometries = ["OC-6"]
labilises = "cis"
leaving = ["a"]
series = ["b", "a"]
ties = "statistical"
"""


# ---------------------------------------------------------------- textbook Pt(II) syntheses


def test_cis_platin_from_tetrachloroplatinate():
    # Housecroft & Sharpe, Inorganic Chemistry, trans effect section; Miessler & Tarr,
    # Inorganic Chemistry, ch. 12 (trans effect): [PtCl4]2- + 2 NH3 gives cis-[PtCl2(NH3)2]
    # because Cl- (trans effect Cl- > NH3) labilises the Cl trans to it.
    plan = plan_routes("[PtCl4]2-", "cis-[PtCl2(NH3)2]")
    assert plan.geometry == "SP-4"  # Pt(II), d8: square planar (Housecroft & Sharpe)
    assert plan.rules.name == "trans-effect"
    assert _reaching_orders(plan) == [("NH3", "NH3")]
    last = plan.reaching[0].steps[-1].prediction
    assert last.decided_by == "rule" and "Cl > NH3" in last.reason


def test_trans_isomer_from_tetraammineplatinum():
    # Housecroft & Sharpe / Miessler & Tarr, trans effect: [Pt(NH3)4]2+ + 2 Cl- gives
    # trans-[PtCl2(NH3)2]: the first Cl labilises the NH3 trans to it.
    plan = plan_routes("[Pt(NH3)4]2+", "trans-[PtCl2(NH3)2]")
    assert _reaching_orders(plan) == [("Cl", "Cl")]
    assert plan.reaching[0].steps[-1].product.prefix == "trans"


def test_trans_isomer_not_reached_from_tetrachloroplatinate():
    # same textbook account: [PtCl4]2- + 2 NH3 does not give the trans isomer
    plan = plan_routes("[PtCl4]2-", "trans-[PtCl2(NH3)2]")
    assert plan.reaching == ()
    assert plan.to_dict()["reached"] is False


@pytest.mark.parametrize(
    "target, order",
    [
        # Housecroft & Sharpe, trans effect section; Miessler & Tarr, ch. 12: from [PtCl4]2-,
        # NH3 then NO2- gives the cis isomer; NO2- then NH3 the trans isomer (NO2- > Cl- > NH3)
        ("cis-[PtCl2(NH3)(NO2)]-", ("NH3", "NO2")),
        ("trans-[PtCl2(NH3)(NO2)]-", ("NO2", "NH3")),
    ],
)
def test_nitro_ammine_isomers_by_order_of_addition(target, order):
    plan = plan_routes("[PtCl4]2-", target)
    assert _reaching_orders(plan) == [order]
    assert len(plan.routes) == 2  # both orders searched (counting)
    final = plan.reaching[0].steps[-1].prediction
    assert (
        final.major.formula == "[PtCl2(NH3)(NO2)]-"
    )  # charge: -2, one Cl- swapped for neutral NH3 -> -1 (ionic counting)


def test_cli_route_text_and_json(capsys):
    main(["route", "[PtCl4]2-", "--target", "trans-[PtCl2(NH3)(NO2)]-"])
    out = capsys.readouterr().out
    assert "Route 1: +NO2, +NH3 -> reaches the target" in out  # Housecroft & Sharpe, as above
    assert "NO2 > Cl" in out
    main(["route", "[PtCl4]2-", "--target", "cis-[PtCl2(NH3)2]", "--json"])
    doc = json.loads(capsys.readouterr().out)
    for key in (
        "rule_set",
        "start",
        "target",
        "entering",
        "leaving",
        "orders_searched",
        "reached",
        "routes",
        "other_orders",
        "notes",
    ):
        assert key in doc
    assert doc["reached"] is True and doc["entering"] == {"NH3": 2} and doc["leaving"] == {"Cl": 2}
    step = doc["routes"][0]["steps"][1]
    assert step["to"]["prefix"] == "cis" and step["decided_by"] == "rule" and step["replaced_sites"]


def test_carbonyl_routes_carry_cautions(capsys):
    # project rule: outputs involving CO, CN or NO carry the usual cautions (common practice)
    main(["route", "[MnBr(CO)5]", "--target", "cis-[MnBr(CO)4(PPh3)]", "--json"])
    doc = json.loads(capsys.readouterr().out)
    assert any("carbon monoxide" in line.lower() for line in doc["safety"])
    assert build_network("[Cr(CO)6]", "[Cr(CO)5(PPh3)]").to_dict()["safety"]
    assert plan_routes("Ma4", "cis-Ma2b2", geometry="SP-4").safety == ()


def test_cli_route_no_route_message(capsys):
    main(["route", "[PtCl4]2-", "--target", "trans-[PtCl2(NH3)2]"])
    assert "No order of addition reaches trans-[PtCl2(NH3)2]" in capsys.readouterr().out  # as above


def test_route_output_is_deterministic(capsys):
    args = ["route", "[PtCl4]2-", "--target", "cis-[PtCl2(NH3)(NO2)]-", "--json"]
    main(args)
    a = capsys.readouterr().out
    main(args)
    assert capsys.readouterr().out == a  # project rule: same input, same bytes


# ---------------------------------------------------------------- statistical ratios


def test_statistical_m_co5_l_gives_cis_trans_4_to_1():
    # counting (common practice): of the five CO of M(CO)5L, four are cis to L and one trans,
    # so replacing one at random gives cis- and trans-M(CO)4L2 in the ratio 4:1
    rs = load_rules()
    stat = load_substitution_rules(rs)["statistical"]
    for formula in ("Ma5b", "[Cr(CO)5(PPh3)]"):
        comp = parse_formula(formula, rs)
        iso = enumerate_isomers_cached(comp, rs.geometry("OC-6")).isomers[0]
        entering = "b" if formula.startswith("M") else "PPh3"
        leaving = ("a",) if formula.startswith("M") else ("CO",)
        p = predict(iso, comp, entering, stat, leaving=leaving, ruleset=rs)
        assert _geo_shares(p) == {"cis": Fraction(4, 5), "trans": Fraction(1, 5)}
        assert p.major.prefix == "cis" and p.decided_by == "statistics"


def test_statistical_third_substitution():
    # counting (common practice): cis-Ma4b2 has two a trans to b (-> mer) and two a cis to
    # both b (-> fac): 1:1, no major product; trans-Ma4b2 gives only mer-Ma3b3
    rs = load_rules()
    stat = load_substitution_rules(rs)["statistical"]
    comp = parse_abstract("Ma4b2")
    cis, trans = enumerate_isomers_cached(comp, rs.geometry("OC-6")).isomers
    p = predict(cis, comp, "b", stat, leaving=("a",))
    assert _geo_shares(p) == {"fac": Fraction(1, 2), "mer": Fraction(1, 2)}
    assert p.major is None and p.decided_by == "undecided"
    p = predict(trans, comp, "b", stat, leaving=("a",))
    assert _geo_shares(p) == {"mer": Fraction(1)}


def test_cli_add_prints_exact_shares(capsys):
    main(["route", "[Cr(CO)5(PPh3)]", "--add", "PPh3", "--rule-set", "statistical", "--json"])
    doc = json.loads(capsys.readouterr().out)
    shares = {s["prefix"]: s["share"] for s in doc["shares"]}
    assert shares == {"cis": "4/5", "trans": "1/5"}  # counting, as above


# ---------------------------------------------------------------- cis-labilisation


def test_cis_labilisation_in_bromopentacarbonylmanganese():
    # Atwood & Brown, J. Am. Chem. Soc. 98 (1976) 3160: in Mn(CO)5Br the CO groups cis to Br
    # are labilised, so substitution by a phosphine gives cis-[MnBr(CO)4L] (from memory)
    p = predict_step("[MnBr(CO)5]", "PPh3")
    assert p.rules.name == "cis-labilisation"
    assert p.major.prefix == "cis" and p.decided_by == "rule"
    plan = plan_routes("[MnBr(CO)5]", "cis-[MnBr(CO)4(PPh3)]")
    assert _reaching_orders(plan) == [("PPh3",)]


def test_abstract_cis_labilisation_ma6_to_fac():
    # a user rule file in which b labilises the a cis to it: Ma6 -> Ma5b -> cis-Ma4b2 -> fac-Ma3b3
    # (site counting: the a cis to both b in cis-Ma4b2 are the pair trans to each other; common practice)
    import tempfile
    from pathlib import Path

    with tempfile.TemporaryDirectory() as d:
        folder = _write_rules(Path(d), "letters-cis", LETTERS_CIS)
        plan = plan_routes("Ma6", "cis-Ma4b2", rules=[folder])
        assert plan.rules.name == "letters-cis"
        assert _reaching_orders(plan) == [("b", "b")]
        assert plan_routes("Ma6", "trans-Ma4b2", rules=[folder]).reaching == ()
        assert _reaching_orders(plan_routes("Ma6", "fac-Ma3b3", rules=[folder])) == [("b", "b", "b")]


# ---------------------------------------------------------------- abstract trans effect with a user rule file


def test_abstract_trans_effect_order_of_addition(tmp_path):
    # demo series c > a > b: the Pt(II) pattern in letters (Housecroft & Sharpe, trans effect)
    folder = _write_rules(tmp_path, "letters-trans", LETTERS_TRANS)
    assert _reaching_orders(plan_routes("Ma4", "cis-Ma2b2", geometry="SP-4", rules=[folder])) == [("b", "b")]
    assert _reaching_orders(plan_routes("Ma4", "cis-Ma2bc", geometry="SP-4", rules=[folder])) == [("b", "c")]
    assert _reaching_orders(plan_routes("Ma4", "trans-Ma2bc", geometry="SP-4", rules=[folder])) == [("c", "b")]


def test_rule_set_must_rank_the_ligands(tmp_path):
    # the built-in trans-effect series names real ligands only, so letters fall back to statistics
    plan = plan_routes("Ma4", "cis-Ma2b2", geometry="SP-4")
    assert plan.rules.name == "statistical" and "does not rank" in plan.rules_reason
    with pytest.raises(InputError, match="does not rank"):
        plan_routes("Ma4", "cis-Ma2b2", geometry="SP-4", rule_set="trans-effect")


# ---------------------------------------------------------------- descriptors and input errors


def test_parse_species():
    assert parse_species("cis-[PtCl2(NH3)2]") == ("[PtCl2(NH3)2]", "cis")  # IUPAC 2005, IR-9.3.2 prefixes
    assert parse_species("(SP-4-2)-[PtCl2(NH3)2]") == ("[PtCl2(NH3)2]", "SP-4-2")
    assert parse_species("Ma4") == ("Ma4", None)


def test_configuration_index_target():
    # IUPAC 2005, IR-9.3.3.4: cis-[PtCl2(NH3)2] is SP-4-2 (configuration index 2)
    plan = plan_routes("[PtCl4]2-", "(SP-4-2)-[PtCl2(NH3)2]")
    assert _reaching_orders(plan) == [("NH3", "NH3")]


def test_target_without_descriptor_is_a_clear_error(capsys):
    with pytest.raises(SystemExit) as exc:
        main(["route", "[PtCl4]2-", "--target", "[PtCl2(NH3)2]"])
    assert exc.value.code == 2  # project rule: input errors exit 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "needs a descriptor" in err


@pytest.mark.parametrize("command", ["route", "network"])
@pytest.mark.parametrize(
    "target, words",
    [
        # charge bookkeeping (common practice): two neutral NH3 replace two Cl-, so [PtCl4]2- gives a neutral
        # [PtCl2(NH3)2] (Housecroft & Sharpe: cisplatin is neutral)
        (
            "cis-[PtCl2(NH3)2]2+",
            "target charge 2+ cannot arise from [PtCl4]2- by replacing 2 Cl- with 2 NH3: expected 0",
        ),
        ("trans-[PtCl2(NH3)(NO2)]", "target charge 0 cannot arise from [PtCl4]2- by replacing 2 Cl-"),
        ("cis-[PdCl2(NH3)2]", "target metal Pd cannot arise from [PtCl4]2- (Pt)"),
        ("cis-Ma2b2", "not written in the same notation"),
    ],
)
def test_a_target_that_cannot_arise_is_refused_in_one_line(capsys, command, target, words):
    with pytest.raises(SystemExit) as exc:
        main([command, "[PtCl4]2-", "--target", target])
    assert exc.value.code == 2  # project rule: input errors exit 2
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and words in err, err


def test_the_charge_refusal_says_how_to_write_the_target():
    with pytest.raises(InputError) as exc:
        plan_routes("[PtCl4]2-", "cis-[PtCl2(NH3)2]2+")
    assert "write the target as cis-[PtCl2(NH3)2]" in str(exc.value)


def test_abstract_letters_carry_no_charge_to_check():
    # letters have no ionic charges: a charge on an abstract target is not judged (common practice here)
    assert _reaching_orders(plan_routes("Ma4", "cis-Ma2b2", geometry="SP-4")) == [("b", "b")]


# ---------------------------------------------------------------- network structure


@pytest.mark.parametrize(
    "start, target, geometry",
    [
        ("Ma6", "Ma3b3", "OC-6"),
        ("Ma4", "Ma2b2", "SP-4"),
        ("Ma6", "Ma4bc", "OC-6"),
        ("[PtCl4]2-", "[PtCl2(NH3)(NO2)]-", None),
    ],
)
def test_network_nodes_and_weights(start, target, geometry):
    net = build_network(start, target, geometry=geometry)
    rs = load_rules()
    nodes = dict(net.nodes)
    per_formula = Counter(dict(a)["formula"] for a in nodes.values())
    for formula, n in net.compositions:
        comp = parse_formula(formula, rs)
        geo = rs.geometry(net.geometry)
        # node count = stereoisomer count, checked against an independent Burnside count
        # (Burnside's lemma over the rotations counts stereoisomers)
        assert per_formula[formula] == n == enumerate_isomers_cached(comp, geo).stereoisomers
        assert n == burnside_counts(comp, geo)[1]
    out = defaultdict(int)
    for a, _, attrs in net.edges:
        e = dict(attrs)
        out[(a, e["entering"], e["leaving"])] += e["weight"]
    for (a, _, leaving), total in out.items():
        formula = dict(nodes[a])["formula"]
        comp = parse_formula(formula, rs)
        # weights out of a node for one replacement = sites the leaving ligand holds (counting)
        assert total == dict((k.name, c) for k, c in comp.parts)[leaving]


def test_network_exports(tmp_path):
    import networkx as nx

    net = build_network("Ma6", "Ma4b2")
    doc = net.to_dict()
    assert len(doc["nodes"]) == 4 and len(doc["edges"]) == 3  # Ma6, Ma5b, cis/trans-Ma4b2 (counting)
    g = nx.node_link_graph(doc, edges="edges")
    cis = next(n for n, d in g.nodes(data=True) if d["formula"] == "Ma4b2" and d["prefix"] == "cis")
    trans = next(n for n, d in g.nodes(data=True) if d["formula"] == "Ma4b2" and d["prefix"] == "trans")
    assert g.edges["Ma5b #1", cis]["weight"] == 4  # four a cis to b give cis (counting)
    assert g.edges["Ma5b #1", trans]["weight"] == 1  # one a trans to b gives trans (counting)
    path = tmp_path / "n.graphml"
    path.write_text(network_graphml(net), encoding="utf-8")
    h = nx.read_graphml(path)
    assert sorted(h.nodes) == sorted(g.nodes)


def test_cli_network_formats(tmp_path, capsys):
    main(["network", "Ma4", "--target", "Ma2b2", "--geometry", "SP-4", "--out", str(tmp_path / "a.svg")])
    main(["network", "Ma4", "--target", "Ma2b2", "--geometry", "SP-4", "--out", str(tmp_path / "b.svg")])
    a = (tmp_path / "a.svg").read_bytes()
    assert a.startswith(b"<?xml") and a == (tmp_path / "b.svg").read_bytes()  # deterministic picture
    main(["network", "Ma4", "--target", "Ma2b2", "--geometry", "SP-4", "--out", str(tmp_path / "n.png")])
    assert (tmp_path / "n.png").read_bytes()[:4] == b"\x89PNG"
    main(["network", "[PtCl4]2-", "--target", "[PtCl2(NH3)2]"])
    assert "[PtCl3(NH3)]- #1" in capsys.readouterr().out


def test_canonical_key_tells_enantiomers_apart():
    # an enantiomer pair shares its key under the full group but not under rotations
    # (definition of a chiral isomer; IUPAC 2005, IR-9.3.4)
    rs = load_rules()
    comp = parse_abstract("Ma2b2c2")
    geo = rs.geometry("OC-6")
    s = enumerate_isomers_cached(comp, geo)
    a, b = s.get("1a"), s.get("1b")
    assert canonical_key(a, geo) != canonical_key(b, geo)
    assert canonical_key(a, geo, proper=False) == canonical_key(b, geo, proper=False)


def test_product_index_is_read_only_and_finds_the_replaced_decoration():
    # project rule: caches return immutable data; site relations (common practice):
    # an a cis to both b of trans-Ma4b2 replaced by b gives mer-Ma3b3
    rs = load_rules()
    geo = rs.geometry("OC-6")
    comp = parse_abstract("Ma4b2")
    index = isomer_index(comp, geo)
    with pytest.raises(TypeError):
        index[()] = "x"  # type: ignore[index]
    cis, trans = enumerate_isomers_cached(comp, geo).isomers
    kinds = {k.name: k for k in comp.kinds}
    deco = replace_site(decoration(trans), 0, "a", "b")
    mer = enumerate_isomers_cached(parse_abstract("Ma3b3"), geo).isomers[1]
    assert canonical_key(deco, geo, kinds) == canonical_key(mer, geo)


def test_resolve_species_refuses_what_it_cannot_name():
    rs = load_rules()
    comp = parse_abstract("Ma4b2")
    iset = enumerate_isomers_cached(comp, rs.geometry("OC-6"))
    assert [i.id for i in resolve_species(iset, comp, "trans", role="target")] == ["2"]
    with pytest.raises(InputError, match="needs a descriptor"):
        resolve_species(iset, comp, None, role="start")
    with pytest.raises(InputError, match="no isomer of Ma4b2 is 'fac'"):
        resolve_species(iset, comp, "fac", role="target")


def test_prediction_json_and_major_sites():
    # Atwood & Brown (1976), as above: the CO cis to Br are replaced
    p = predict_step("[MnBr(CO)5]", "PPh3")
    doc = p.to_dict()
    assert list(doc) == [
        "start",
        "entering",
        "rule_set",
        "safety",
        "decided_by",
        "reason",
        "major",
        "shares",
        "statistical_shares",
        "sites",
    ]
    assert doc["rule_set"]["name"] == "cis-labilisation" and doc["major"]["prefix"] == "cis"
    assert len(p.major_sites) == 4  # four CO cis to Br (counting)
    assert {c.leaving for c in p.major_sites} == {"CO"}


def test_route_plan_json_keys_in_order():
    plan = plan_routes("[PtCl4]2-", "cis-[PtCl2(NH3)2]")
    doc = plan.to_dict()
    assert list(doc)[:2] == ["schema_version", "geometry"]
    step = doc["routes"][0]["steps"][1]
    assert list(step) == [
        "step",
        "entering",
        "leaving",
        "from",
        "to",
        "replaced_sites",
        "decided_by",
        "reason",
        "shares",
    ]
    assert step["replaced_sites"] == [1, 3]  # the two Cl trans to Cl (Housecroft & Sharpe, as above)


def test_network_renderers(tmp_path):
    net = build_network("Ma4", "Ma2b2", geometry="SP-4")
    g = net.to_graph()
    assert g.number_of_nodes() == len(net.nodes) and g.number_of_edges() == len(net.edges)
    text = network_text(net)
    assert text.startswith("Network Ma4 -> Ma2b2 on SP-4\n") and "Ma3b #1" in text
    assert network_svg(net) == network_svg(net)  # project rule: same input, same bytes
    assert network_picture(net, "png")[:4] == b"\x89PNG"
