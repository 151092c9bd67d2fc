"""load_config: the [tool.normform] table from normform.toml or pyproject.toml, searched upward."""
import pytest

from normform.config import ConfigError, find_config, load_config
from normform.ids import make, link


def test_no_config_gives_empty_table(tmp_path):
    assert find_config(tmp_path) is None and load_config(tmp_path) == {}
    (tmp_path / "pyproject.toml").write_text("[project]\nname = 'x'\n")
    assert find_config(tmp_path) != tmp_path / "pyproject.toml"


def test_pyproject_table_found_upward(tmp_path):
    (tmp_path / "pyproject.toml").write_text(
        '[tool.normform.links]\nmr = "https://reviews.example/{id}"\nzbl = "https://z.example/?q={id}"\n')
    deep = tmp_path / "a" / "b"
    deep.mkdir(parents=True)
    cfg = load_config(deep)
    assert cfg["links"]["mr"] == "https://reviews.example/{id}"
    assert link(make("mr", "MR45386"), cfg) == "https://reviews.example/0045386"
    assert link(make("zbl", "Zbl 1127.11002"), cfg) == "https://z.example/?q=1127.11002"


def test_normform_toml_wins_in_the_same_folder(tmp_path):
    (tmp_path / "pyproject.toml").write_text('[tool.normform]\nsource = "pyproject"\n')
    (tmp_path / "normform.toml").write_text('source = "own"\n[lint]\nmax = 3\n')
    assert load_config(tmp_path) == {"source": "own", "lint": {"max": 3}}


def test_nearest_wins(tmp_path):
    (tmp_path / "normform.toml").write_text('level = "top"\n')
    sub = tmp_path / "sub"
    sub.mkdir()
    (sub / "pyproject.toml").write_text('[tool.normform]\nlevel = "sub"\n')
    assert load_config(sub)["level"] == "sub"
    assert load_config(tmp_path)["level"] == "top"


def test_bad_toml_has_position(tmp_path):
    (tmp_path / "normform.toml").write_text('ok = 1\nbroken = \n')
    with pytest.raises(ConfigError) as info:
        load_config(tmp_path)
    assert info.value.line == 2 and str(tmp_path / "normform.toml") in str(info.value)


def test_links_must_be_strings(tmp_path):
    (tmp_path / "normform.toml").write_text('[links]\nmr = 3\n')
    with pytest.raises(ConfigError, match="template"):
        load_config(tmp_path)
