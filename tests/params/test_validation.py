"""Every kind of bad parameter file raises ParameterError naming the file and the field."""

from __future__ import annotations

import math

import pytest

from valband.errors import ParameterError
from valband.params import dumps, load_parameter_set

from .helpers import base_dict

HOP = ("pairs", "Cu-Cu", "hopping")


def _set(d, path, value):
    for k in path[:-1]:
        d = d[k]
    d[path[-1]] = value


def _del(d, path):
    for k in path[:-1]:
        d = d[k]
    del d[path[-1]]


def put(path, value):
    return lambda d: _set(d, path, value)


def drop(path):
    return lambda d: _del(d, path)


def law(path, **fields):
    return lambda d: _set(d, path, dict(fields))


def _dup_pair(d):
    # the same pair again in the other direction, with the integrals renamed accordingly
    partner = {"sps": "pss", "pss": "sps", "sds": "dss", "pds": "dps", "pdp": "dpp"}
    pair = dict(d["pairs"]["Al-Cu"])
    pair["hopping"] = {partner.get(k, k): v for k, v in pair["hopping"].items()}
    d["pairs"]["Cu-Al"] = pair


def _nonorthogonal_without_overlap(d):
    d["orthogonal"] = False


def _overlap(value):
    def mutate(d):
        d["orthogonal"] = False
        for key, pair in d["pairs"].items():
            pair["overlap"] = {n: {"law": "power", "v0": 0.01, "r0": 2.6, "n": 3.0}
                               for n in pair["hopping"]}  # fmt: skip
        d["pairs"]["Cu-Cu"]["overlap"]["sss"]["v0"] = value

    return mutate


# (id, mutation, text that must appear in the message) — the field path is TOML dotted syntax
CASES = [
    ("unknown top-level key", put(("colour",), "red"), "colour: unknown key"),
    ("missing name", drop(("name",)), "name: missing field"),
    ("empty name", put(("name",), "  "), "name: empty string"),
    ("orthogonal not boolean", put(("orthogonal",), "yes"), "orthogonal: expected a boolean"),
    ("schema version 2", put(("schema_version",), 2), "schema_version: schema version 2 is not"),
    ("schema version string", put(("schema_version",), "1"), "schema_version"),
    ("schema version missing", drop(("schema_version",)), "schema_version: missing field"),
    ("no elements", put(("elements",), {}), "elements: no elements"),
    ("no pairs", put(("pairs",), {}), "pairs: no pairs"),
    ("not an element", put(("elements", "Xx"), {}), "elements.Xx: 'Xx' is not a chemical"),
    ("unknown element key", put(("elements", "Cu", "mass"), 63.5), "elements.Cu.mass: unknown"),
    ("shells misordered", put(("elements", "Cu", "shells"), ["d", "s", "p"]), "elements.Cu.shells"),
    ("shell unknown", put(("elements", "Cu", "shells"), ["s", "f"]), "elements.Cu.shells[1]"),
    ("shell repeated", put(("elements", "Al", "shells"), ["s", "s", "p"]), "elements.Al.shells"),
    ("shells empty", put(("elements", "Al", "shells"), []), "elements.Al.shells"),
    ("onsite missing shell", drop(("elements", "Cu", "onsite", "d")),
     "elements.Cu.onsite.d: missing"),
    ("onsite of absent shell",
     put(("elements", "Al", "onsite", "d"), {"value": -5.0, "source": "x"}),
     "elements.Al.onsite.d: onsite energy for shell 'd', which Al does not have"),
    ("onsite wrong type", put(("elements", "Cu", "onsite", "s", "value"), "-4.6"),
     "elements.Cu.onsite.s.value: expected a number, got a string"),
    ("onsite boolean", put(("elements", "Cu", "onsite", "s", "value"), True),
     "elements.Cu.onsite.s.value: expected a number, got a boolean"),
    ("onsite nan", put(("elements", "Cu", "onsite", "s", "value"), math.nan),
     "elements.Cu.onsite.s.value: nan is not finite"),
    ("onsite inf", put(("elements", "Cu", "onsite", "p", "value"), -math.inf),
     "elements.Cu.onsite.p.value: -inf is not finite"),
    ("onsite no source", drop(("elements", "Cu", "onsite", "s", "source")),
     "elements.Cu.onsite.s.source: missing field"),
    ("zero electrons", put(("elements", "Cu", "valence_electrons", "value"), 0),
     "elements.Cu.valence_electrons.value: 0 electrons are impossible"),
    ("too many electrons spd", put(("elements", "Cu", "valence_electrons", "value"), 19),
     "0 < N ≤ 18"),
    ("too many electrons sp", put(("elements", "Al", "valence_electrons", "value"), 9),
     "elements.Al.valence_electrons.value: 9 electrons are impossible for shells s, p"),
    ("pair key malformed", put(("pairs", "CuCu"), {}), 'pairs.CuCu: pair key'),
    ("pair of a non-element", put(("pairs", "Cu-Qq"), {}), "'Qq' is not a chemical element"),
    ("pair of an undeclared element", put(("pairs", "Cu-Ag"), {}),
     'pairs."Cu-Ag": element Ag has no [elements.Ag] table'),
    ("duplicated pair", _dup_pair, 'pairs."Cu-Al": duplicated pair: also given as "Al-Cu"'),
    ("pair unknown key", put(("pairs", "Cu-Cu", "colour"), "x"), 'pairs."Cu-Cu".colour: unknown'),
    ("pair missing source", drop(("pairs", "Cu-Cu", "source")), 'pairs."Cu-Cu".source: missing'),
    ("missing cutoff", drop(("pairs", "Cu-Cu", "cutoff")), 'pairs."Cu-Cu".cutoff: missing field'),
    ("cutoff outer below inner", put(("pairs", "Cu-Cu", "cutoff", "outer"), 3.0),
     'pairs."Cu-Cu".cutoff.outer: outer 3 Å ≤ inner'),
    ("cutoff negative", put(("pairs", "Cu-Cu", "cutoff", "inner"), -1.0),
     'pairs."Cu-Cu".cutoff.inner: -1 is out of range'),
    ("cutoff unknown taper", put(("pairs", "Cu-Cu", "cutoff", "taper"), "linear"),
     'pairs."Cu-Cu".cutoff.taper: unknown taper'),
    ("unknown integral", put(HOP + ("ffs",), {}), 'pairs."Cu-Cu".hopping.ffs: unknown integral'),
    ("integral of absent shell, like pair", put(("pairs", "Al-Al", "hopping", "sds"), {}),
     'pairs."Al-Al".hopping.sds: integral needs a d shell on Al (second element)'),
    ("integral of absent shell, unlike pair", put(("pairs", "Al-Cu", "hopping", "dss"), {}),
     'pairs."Al-Cu".hopping.dss: integral needs a d shell on Al (first element)'),
    ("reversed integral in like pair", put(HOP + ("pss",), {}),
     'pairs."Cu-Cu".hopping.pss: reversed integral in a like pair (it equals sps)'),
    ("missing reversed integral", drop(("pairs", "Al-Cu", "hopping", "pss")),
     'pairs."Al-Cu".hopping.pss: missing reversed integral'),
    ("missing integral", drop(HOP + ("dds",)), 'pairs."Cu-Cu".hopping.dds: missing field'),
    ("law missing", put(HOP + ("dds",), {"v0": 1.0}), 'pairs."Cu-Cu".hopping.dds.law: missing'),
    ("law unknown", law(HOP + ("dds",), law="linear"), 'hopping.dds.law: unknown law'),
    ("power negative r0", law(HOP + ("dds",), law="power", v0=-0.3, r0=-2.5, n=5.0),
     'pairs."Cu-Cu".hopping.dds.r0: -2.5 is out of range'),
    ("power exponent negative", law(HOP + ("dds",), law="power", v0=-0.3, r0=2.5, n=-1.0),
     'pairs."Cu-Cu".hopping.dds.n: -1 is out of range; accepted: a number 0 ≤ x ≤ 20'),
    ("power exponent too large", law(HOP + ("dds",), law="power", v0=-0.3, r0=2.5, n=25.0),
     "hopping.dds.n: 25 is out of range"),
    ("power v0 nan", law(HOP + ("dds",), law="power", v0=math.nan, r0=2.5, n=5.0),
     "hopping.dds.v0: nan is not finite"),
    ("power extra key", law(HOP + ("dds",), law="power", v0=-0.3, r0=2.5, n=5.0, q=1.0),
     "hopping.dds.q: unknown key"),
    ("power missing exponent", law(HOP + ("dds",), law="power", v0=-0.3, r0=2.5),
     "hopping.dds.n: missing field"),
    ("exponential q negative", law(HOP + ("sss",), law="exponential", v0=-1.0, r0=2.5, q=-0.5),
     'pairs."Cu-Cu".hopping.sss.q: -0.5 is out of range'),
    ("exponential q too large", law(HOP + ("sss",), law="exponential", v0=-1.0, r0=2.5, q=60.0),
     "hopping.sss.q: 60 is out of range"),
    ("spline not monotonic", law(HOP + ("dds",), law="spline", r=[2.0, 3.0, 2.5, 4.5],
                                 v=[-1.0, -0.3, -0.2, -0.01]),
     'pairs."Cu-Cu".hopping.dds.r[2]: nodes not increasing'),
    ("spline too short", law(HOP + ("dds",), law="spline", r=[2.0, 4.5], v=[-1.0, -0.01]),
     "hopping.dds.r: 2 entries"),
    ("spline length mismatch", law(HOP + ("dds",), law="spline", r=[2.0, 3.0, 4.0, 4.5],
                                   v=[-1.0, -0.3, -0.2, -0.1, -0.05]),
     "hopping.dds.v: 5 values for 4 nodes"),
    ("spline ends before cutoff", law(HOP + ("dds",), law="spline", r=[2.0, 2.5, 3.0, 3.5],
                                      v=[-1.0, -0.3, -0.2, -0.1]),
     "hopping.dds.r: table ends at 3.5 Å, before the outer cutoff"),
    ("spline negative node", law(HOP + ("dds",), law="spline", r=[-2.0, 3.0, 4.0, 4.5],
                                 v=[-1.0, -0.3, -0.2, -0.1]),
     "hopping.dds.r[0]: -2 is out of range"),
    ("spline value string", law(HOP + ("dds",), law="spline", r=[2.0, 3.0, 4.0, 4.5],
                                v=[-1.0, "x", -0.2, -0.1]),
     "hopping.dds.v[1]: expected a number"),
    ("shells zero tolerance",
     law(HOP + ("dds",), law="shells", tolerance=0.0, shells=[[2.55, -0.3]]),
     "hopping.dds.tolerance: 0 is out of range"),
    ("shells tolerance too large", law(HOP + ("dds",), law="shells", tolerance=1.0,
                                       shells=[[2.55, -0.3]]),
     "hopping.dds.tolerance: 1 is out of range"),
    ("shells not increasing", law(HOP + ("dds",), law="shells", tolerance=0.05,
                                  shells=[[3.61, -0.05], [2.55, -0.3]]),
     'pairs."Cu-Cu".hopping.dds.shells[1][0]: shell at 2.55 Å not above'),
    ("shells too close", law(HOP + ("dds",), law="shells", tolerance=0.05,
                             shells=[[2.55, -0.3], [2.6, -0.2]]),
     "hopping.dds.shells[1][0]"),
    ("shell in the taper", law(HOP + ("dds",), law="shells", tolerance=0.05,
                               shells=[[2.55, -0.3], [3.9, -0.02]]),
     "hopping.dds.shells[1][0]: shell at 3.9 Å (± 0.05) reaches into the taper"),
    ("shell item malformed", law(HOP + ("dds",), law="shells", tolerance=0.05,
                                 shells=[[2.55, -0.3, 1.0]]),
     "hopping.dds.shells[0]"),
    ("overlap in orthogonal set", put(("pairs", "Cu-Cu", "overlap"), {}),
     'pairs."Cu-Cu".overlap: overlap integrals in an orthogonal set'),
    ("overlap missing", _nonorthogonal_without_overlap, "overlap: missing field"),
    ("overlap larger than one", _overlap(1.5), 'pairs."Cu-Cu".overlap.sss.v0: 1.5 is out of range'),
]


@pytest.mark.parametrize("mutate, fragment", [c[1:] for c in CASES], ids=[c[0] for c in CASES])
def test_bad_file_raises_parameter_error_naming_the_field(tmp_path, mutate, fragment):
    d = base_dict()
    mutate(d)
    path = tmp_path / "bad.toml"
    path.write_text(dumps(d), encoding="utf-8")
    with pytest.raises(ParameterError) as info:
        load_parameter_set(path)
    msg = str(info.value)
    assert str(path) in msg
    assert fragment in msg
    assert "accepted:" in msg


def test_valid_variants_of_the_base_load(tmp_path):
    # the mutations above start from a valid set; a few valid alternative forms load too
    d = base_dict()
    hop = d["pairs"]["Cu-Cu"]["hopping"]
    hop["dds"] = {"law": "shells", "tolerance": 0.05, "shells": [[2.553, -0.34], [3.61, -0.06]]}
    hop["sss"] = {"law": "spline", "r": [2.0, 2.5, 3.5, 4.5], "v": [-2.0, -1.5, -0.8, -0.4],
                  "source": "own"}  # fmt: skip
    d["pairs"]["Cu-Cu"]["cutoff"]["taper"] = "cosine"
    path = tmp_path / "good.toml"
    path.write_text(dumps(d), encoding="utf-8")
    ps = load_parameter_set(path)
    assert ps.pair("Cu", "Cu").hopping["sss"].source == "own"
    assert ps.to_dict() == d


def test_toml_syntax_error_and_duplicate_key(tmp_path):
    path = tmp_path / "dup.toml"
    path.write_text(dumps(base_dict()) + '\n[pairs."Cu-Cu"]\nsource = "again"\n', encoding="utf-8")
    with pytest.raises(ParameterError, match=r"dup\.toml: not valid TOML.*accepted"):
        load_parameter_set(path)
    path = tmp_path / "broken.toml"
    path.write_text("name = \n", encoding="utf-8")
    with pytest.raises(ParameterError, match=r"broken\.toml: not valid TOML"):
        load_parameter_set(path)


def test_not_utf8(tmp_path):
    path = tmp_path / "latin.toml"
    path.write_bytes(b'name = "\xe9"\n')
    with pytest.raises(ParameterError, match="not UTF-8"):
        load_parameter_set(path)


def test_from_dict_without_a_file_names_the_dict():
    from valband.params import ParameterSet

    d = base_dict()
    d["orthogonal"] = 1
    with pytest.raises(ParameterError, match=r"<parameter dict>: orthogonal"):
        ParameterSet.from_dict(d)
