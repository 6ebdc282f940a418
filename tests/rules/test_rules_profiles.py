"""The registry and the profiles: bundled values, a user's own file, and every profile error."""

from __future__ import annotations

import re

import pytest
from rules_buildings import flat

from knockproof.errors import InputError
from knockproof.rules import bundled_profiles, load_profile, registry

FT = 0.3048
PSI = 6894.757293168

RULE_IDS = {
    "arrestor.required", "arrestor.placement", "arrestor.branch-length", "arrestor.size-class",
    "arrestor.gas-volume", "arrestor.both-sides", "arrestor.redundant", "velocity.cold-limit",
    "velocity.hot-limit", "pressure.static-limit", "pressure.minimum-flowing", "surge.peak-limit",
    "surge.pipe-rating", "surge.component-rating", "surge.arrestor-raises-peak",
    "system.closed-no-expansion-tank",
}

UNIT_SUFFIX = re.compile(r"(_m|_m_per_s|_pa|_m3|_c|_s)(_by_\w+)?$")


def test_registry_holds_every_rule_with_a_basis():
    rules = registry()
    assert set(rules) == RULE_IDS
    for r in rules.values():
        assert re.fullmatch(r"[a-z]+\.[a-z0-9-]+", r.id)
        assert r.severity in ("error", "warning", "info")
        assert r.basis and r.title and r.notes
        for name, value in r.parameters.items():
            if isinstance(value, float) and name not in (
                    "separate_lines_factor", "polytropic_exponent", "rating_factor"):
                assert UNIT_SUFFIX.search(name), f"{r.id}: {name} has no unit in its name"


def test_bundled_profiles():
    assert bundled_profiles() == ["si-default", "us-default"]


def test_us_default_values():
    p = load_profile("us-default")
    assert p.params("velocity.cold-limit")["max_velocity_m_per_s"] == pytest.approx(8 * FT)
    assert p.params("velocity.hot-limit")["max_velocity_m_per_s"] == pytest.approx(5 * FT)
    assert p.params("pressure.static-limit")["limit_pa"] == pytest.approx(80 * PSI)
    assert p.params("surge.peak-limit")["limit_pa"] == pytest.approx(150 * PSI)
    assert p.params("arrestor.branch-length")["single_arrestor_max_branch_m"] == pytest.approx(
        20 * FT)
    assert all(p.enabled(r) for r in RULE_IDS)


def test_si_default_values():
    # BS 6700 (C): 3.0 m/s at 10-50 degC, 2.5 m/s at 70 degC, 2.0 m/s at 90 degC.
    p = load_profile("si-default")
    hot = p.params("velocity.hot-limit")
    assert hot["table_temperatures_c"] == [50, 70, 90]
    assert hot["table_max_velocities_m_per_s"] == [3.0, 2.5, 2.0]
    assert p.params("velocity.cold-limit")["max_velocity_m_per_s"] == pytest.approx(3.0)
    assert p.params("arrestor.placement")["max_distance_m"] == pytest.approx(2.0)
    # everything else as the US profile
    assert p.params("pressure.static-limit")["limit_pa"] == pytest.approx(80 * PSI)


def test_user_profile_with_base_and_units(write):
    path = write('name = "office"\nbase = "us-default"\n'
                 '[rules."velocity.cold-limit"]\nmax_velocity_m_per_s = "7 ft/s"\n'
                 'severity = "error"\n'
                 '[rules."system.closed-no-expansion-tank"]\nenabled = false\n'
                 '[rules."pressure.minimum-flowing"]\n'
                 'minimum_pa_by_kind = { water-closet-flush-valve = "45 psi" }\n', "office.toml")
    p = load_profile(path)
    assert p.name == "office"
    assert p.params("velocity.cold-limit")["max_velocity_m_per_s"] == pytest.approx(7 * FT)
    assert p.severity("velocity.cold-limit") == "error"
    assert not p.enabled("system.closed-no-expansion-tank")
    kinds = p.params("pressure.minimum-flowing")["minimum_pa_by_kind"]
    assert kinds["water-closet-flush-valve"] == pytest.approx(45 * PSI)  # IPC 604.3 blowout (C)
    assert kinds["lavatory"] == pytest.approx(8 * PSI)  # kept from the data file


def test_profile_switches_a_rule_off(check, write):
    path = write('base = "us-default"\n[rules."system.closed-no-expansion-tank"]\n'
                 "enabled = false\n", "p.toml")
    bfp = '\n[[device]]\nid = "BFP"\nkind = "backflow-preventer"\nnode = "S"\n'
    c = check(flat() + bfp, profile=path)
    assert c.rule("system.closed-no-expansion-tank") == []
    assert "system.closed-no-expansion-tank" not in c.review.rules_applied


def test_building_picks_its_profile(check):
    c = check(flat(extra='profile = "si-default"'))
    assert c.review.profile == "si-default"
    assert check(flat()).review.profile == "us-default"
    # an SI building takes si-default unless it says otherwise
    si = flat().replace('units = "us"', 'units = "si"').replace('length = 20', 'length = 6') \
        .replace('length = 10', 'length = 3').replace('length = 8', 'length = 2.4') \
        .replace('length = 5', 'length = 1.5')
    assert check(si).review.profile == "si-default"


def test_building_profile_path_next_to_the_building(check, write):
    write('name = "local"\nbase = "si-default"\n', "local-rules.toml")
    c = check(flat(extra='profile = "local-rules.toml"'))
    assert c.review.profile == "local"


def _err(write, text: str, match: str) -> None:
    path = write(text, "bad.toml")
    with pytest.raises(InputError, match=match) as info:
        load_profile(path)
    assert str(path) in str(info.value)


def test_error_unknown_rule(write):
    _err(write, '[rules."velocity.cold-limt"]\nmax_velocity_m_per_s = 2\n',
         r'rule "velocity.cold-limt": unknown rule; known rules: arrestor.required')


def test_error_unknown_parameter(write):
    _err(write, '[rules."velocity.cold-limit"]\nmax_speed = 2\n',
         r"rule \"velocity.cold-limit\": field 'max_speed': unknown parameter; this rule takes: "
         r"enabled, severity, basis, max_velocity_m_per_s")


def test_error_wrong_unit(write):
    _err(write, '[rules."velocity.cold-limit"]\nmax_velocity_m_per_s = "8 psi"\n',
         r"field 'max_velocity_m_per_s': expected a velocity such as '8 ft/s' or '2.4 m/s', "
         r"found '8 psi'")


def test_error_wrong_type(write):
    _err(write, '[rules."arrestor.required"]\nonly_when_peak_exceeds_limit = "yes"\n',
         r"field 'only_when_peak_exceeds_limit': expected true or false, found 'yes'")


def test_error_negative(write):
    _err(write, '[rules."arrestor.placement"]\nmax_distance_m = -1\n',
         r"field 'max_distance_m': must not be negative")


def test_error_bad_severity(write):
    _err(write, '[rules."arrestor.placement"]\nseverity = "fatal"\n',
         r"field 'severity': expected one of error, warning, info, found 'fatal'")


def test_error_line_number(write):
    path = write('name = "x"\n\n[rules."arrestor.placement"]\n# distance\nmax_distance_m = "far"\n',
                 "lines.toml")
    with pytest.raises(InputError, match=r"lines.toml:5: rule \"arrestor.placement\""):
        load_profile(path)


def test_error_table_lengths(write):
    _err(write, '[rules."velocity.hot-limit"]\ntable_temperatures_c = [50, 70]\n'
         "table_max_velocities_m_per_s = [3.0]\n",
         r"field 'table_max_velocities_m_per_s': needs one velocity per temperature")


def test_error_polytropic_exponent(write):
    _err(write, '[rules."arrestor.gas-volume"]\npolytropic_exponent = 2.5\n',
         r"field 'polytropic_exponent': must be from 1 \(isothermal\) to 5/3")


def test_error_unknown_top_level_key(write):
    _err(write, 'nmae = "x"\n', r"profile: field 'nmae': unknown key")


def test_error_not_toml(write):
    _err(write, '[rules."x"\n', r"profile: is not valid TOML")


def test_error_base_loop(write):
    write('base = "b.toml"\n', "a.toml")
    write('base = "a.toml"\n', "b.toml")
    path = write('base = "a.toml"\n', "bad.toml")
    with pytest.raises(InputError, match=r"field 'base': profiles name each other as base in a "
                                         r"loop"):
        load_profile(path)


def test_error_unknown_profile_name():
    with pytest.raises(InputError, match=r"no-such-profile: profile: no bundled profile of this "
                                         r"name and no such file; bundled profiles: si-default, "
                                         r"us-default"):
        load_profile("no-such-profile")


def test_error_unknown_profile_in_building(check):
    with pytest.raises(InputError, match=r"no bundled profile of this name"):
        check(flat(extra='profile = "nowhere"'))
