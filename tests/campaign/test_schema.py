"""Campaign files: expansion, seeds, keys, fingerprints, and errors naming line and key."""

from __future__ import annotations

import re

import pytest

from valband.campaign import load_campaign, parse_campaign
from valband.errors import InputError

from .campaigns import SMALL, write


def test_expansion_of_grids_and_plain_systems(small):
    c = load_campaign(small)
    specs = [x.inputs["structure"] for x in c.candidates]
    # binary grid with step 0.5: Cu, Cu0.5Pd0.5, Pd (the ends through 'pure')
    assert specs[0] == "Cu fcc" and specs[2] == "Pd fcc"
    assert re.fullmatch(r"random Cu0\.5Pd0\.5 fcc 2x1x1 seed=\d+", specs[1])
    assert specs[3:] == ["Cu3Pd L12", "Zr hcp", "Cu fcc"]
    assert [x.inputs["method"] for x in c.candidates] == ["kmesh"] * 3 + ["kpm", "kmesh", "cpa"]
    assert c.candidates[1].inputs["composition"] == {"Cu": 0.5, "Pd": 0.5}
    assert c.elements == ("Cu", "Pd")


def test_ternary_grid_and_strains():
    text = SMALL.replace('elements = ["Cu", "Pd"]\nstep = 0.5',
                         'elements = ["Cu", "Pd", "Pt"]\nstep = 0.5\nstrains = [0.0, -0.01]')
    c = parse_campaign(text)
    grid = [x for x in c.candidates if x.inputs["system"] == "CuPdPt"]
    # step 1/2 on the triangle: 3 corners + 3 edge midpoints, times two strains
    assert len(grid) == 12
    comps = {tuple(x.inputs["composition"].values()) for x in grid}
    assert comps == {(1, 0, 0), (0, 1, 0), (0, 0, 1), (0.5, 0.5, 0), (0.5, 0, 0.5), (0, 0.5, 0.5)}
    strained = [x.inputs["structure"] for x in grid if x.inputs["strain"] == -0.01]
    assert all(s.endswith(" strain=-0.01") for s in strained)


def test_seeds_keys_and_fingerprint_are_stable():
    a, b = parse_campaign(SMALL), parse_campaign(SMALL)
    assert [x.key for x in a.candidates] == [x.key for x in b.candidates]
    assert a.fingerprint == b.fingerprint
    seed = a.candidates[1].inputs["seed"]
    assert a.candidates[1].inputs["structure"].endswith(f"seed={seed}")
    # another master seed → other structure seeds, other keys, another fingerprint
    c = parse_campaign(SMALL.replace("seed = 11", "seed = 12"))
    assert c.candidates[1].inputs["seed"] != seed and c.fingerprint != a.fingerprint
    # reordering systems keeps every candidate and the fingerprint
    parts = SMALL.split("[[system]]")
    swapped = parse_campaign(parts[0] + "[[system]]" + parts[2] + "[[system]]" + parts[1]
                             + "[[system]]" + "[[system]]".join(parts[3:]))
    assert swapped.fingerprint == a.fingerprint


def _line_of(text: str, needle: str) -> int:
    return next(i for i, ln in enumerate(text.splitlines(), 1) if needle in ln)


@pytest.mark.parametrize("old, new, key, needle", [
    ("width = 0.2", "widht = 0.2", "defaults.kmesh.widht", "widht"),
    ("width = 0.2", "width = -1", "defaults.kmesh.width", "width = -1"),
    ('method = "kpm"', 'method = "fast"', "system[1].method", 'method = "fast"'),
    ("n_vectors = 2", "n_vectors = 2.5", "system[1].kpm.n_vectors", "n_vectors = 2.5"),
    ('structures = ["Zr hcp"]', 'structures = ["Zr hcpp"]', "system[2].structures[0]",
     "Zr hcpp"),
    ("seed={seed}", "seed={sed}", "system[0].structures[0]", "seed={sed}"),
    ("step = 0.5", "step = 0.3", "system[0].step", "step = 0.3"),
    ('window = [-7.0, 5.0]', 'window = [6.0, -12.0]', "defaults.window", "window = [6.0"),
])
def test_malformed_values_name_line_and_key(old, new, key, needle):
    text = SMALL.replace(old, new, 1)
    assert text != SMALL
    with pytest.raises(InputError) as err:
        parse_campaign(text, "camp.toml")
    msg = str(err.value)
    assert f"line {_line_of(text, needle)}," in msg, msg
    assert f"key {key!r}" in msg, msg


def test_toml_syntax_error_names_the_line(tmp_path):
    text = SMALL.replace('name = "small-test"', 'name = "small-test')
    with pytest.raises(InputError, match=r"not valid TOML.*line 4"):
        load_campaign(write(tmp_path, text))


def test_missing_pieces_and_files(tmp_path):
    with pytest.raises(InputError, match="no such file"):
        load_campaign(tmp_path / "nope.toml")
    with pytest.raises(InputError, match="key 'schema'"):
        parse_campaign(SMALL.replace("schema = 1\n", ""))
    with pytest.raises(InputError, match="schema 1"):
        parse_campaign(SMALL.replace("schema = 1", "schema = 2"))
    with pytest.raises(InputError, match=r"line \d+, key 'defaults.params'.*cannot be loaded"):
        parse_campaign(SMALL.replace('[defaults]\n', '[defaults]\nparams = "no-such-set"\n'))
    with pytest.raises(InputError, match="system"):
        parse_campaign(SMALL.split("[[system]]")[0])


def test_item_of_a_multiline_array_is_located():
    text = ('schema = 1\n[campaign]\nname = "x"\n[[system]]\nstructures = [\n'
            '    "Cu fcc",\n    "Pd fcc",\n    "Pt fccc",\n]\n')
    with pytest.raises(InputError, match=r"line 8, key 'system\[0\]\.structures\[2\]'.*fccc"):
        parse_campaign(text, "c.toml")
