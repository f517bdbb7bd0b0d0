"""Hydration volume bookkeeping and Powers' model."""
import periodictable
import pytest

from specgen import refdata
from specgen.science.hydration import (
    BELITE_HYDRATION, POZZOLANIC, Reaction, check_balanced, csh_density_sensitivity, powers,
    reaction_balance, water_for_full_hydration)
from specgen.science.oxides import ChemistryInputError

AW = refdata.load("atomic_weights").data
SETS = refdata.load("cement_densities").data
BENTZ = SETS["bentz_nist"]["values"]            # Bentz, NIST chemical-shrinkage tables
PRACTICE = SETS["rounded_practice"]["values"]   # common practice, C-S-H about 2.0 g/cm3


def test_reactions_balance():
    check_balanced(BELITE_HYDRATION, AW)
    check_balanced(POZZOLANIC, AW)
    wrong = Reaction("C2S + 4 H -> C1.7SH4 + 0.3 CH", (("C2S", 1.0), ("H", 4.0)),
                     (("C1.7SH4", 1.0), ("CH", 0.3)))
    with pytest.raises(ChemistryInputError, match="does not balance"):
        check_balanced(wrong, AW)


def test_belite_volumes_bentz_set():
    # By hand, cm3/mol (periodictable-consistent molar masses, Bentz densities g/cm3):
    #   C2S 172.24/3.28 = 52.51; water 4.3*18.015/0.9971 = 77.69;
    #   C1.7SH4 227.47/2.11 = 107.81; CH 0.3*74.09/2.24 = 9.92
    #   shrinkage (130.20 - 117.73)/130.20 = 9.58 %  (DOMAIN primer: ~9.6 %, computed)
    #   solid volume (117.73 - 52.51)/52.51 = +124.2 %  (DOMAIN primer: ~+124 %, computed)
    bal = reaction_balance(BELITE_HYDRATION, AW, BENTZ)
    assert -bal.volumes["C2S"] * 1e6 == pytest.approx(52.51, abs=0.01)
    assert bal.volumes["C1.7SH4"] * 1e6 == pytest.approx(107.81, abs=0.01)
    assert bal.chemical_shrinkage == pytest.approx(0.0958, abs=0.001)
    assert bal.solid_volume_increase == pytest.approx(1.242, abs=0.005)


def test_belite_volumes_rule_of_thumb():
    # Common practice: with C-S-H ~2.0 g/cm3, 1 C2S + 1.5 water -> 2.2 C-S-H + 0.2 CH by
    # volume, chemical shrinkage ~4.5 %, solid volume ~+140 %.  The rule comes from the
    # rounded volumes (2.5 -> 2.4), so tolerances: volumes +-0.05, shrinkage +-0.5 points,
    # solid volume +-5 points (computed: 4.6 %, +137 %).
    bal = reaction_balance(BELITE_HYDRATION, AW, PRACTICE)
    rel = bal.relative
    assert (rel["C2S"], rel["H"], rel["C1.7SH4"], rel["CH"]) == pytest.approx(
        (1.0, 1.5, 2.2, 0.2), abs=0.05)
    assert bal.chemical_shrinkage == pytest.approx(0.045, abs=0.005)
    assert bal.solid_volume_increase == pytest.approx(1.40, abs=0.05)


def test_water_and_lime_per_kg_c2s():
    # By hand (periodictable masses): water 4.3*18.015/172.24 = 0.4498 kg/kg C2S;
    # CH 0.3*74.09/172.24 = 0.1290 kg/kg.  Independent of densities.
    bal = reaction_balance(BELITE_HYDRATION, AW, BENTZ)
    m = lambda f: periodictable.formula(f).mass  # noqa: E731
    assert bal.water_per_kg == pytest.approx(4.3 * m("H2O") / m("Ca2SiO4"), rel=1e-4)
    assert bal.ch_per_kg == pytest.approx(0.3 * m("Ca(OH)2") / m("Ca2SiO4"), rel=1e-4)
    # A binder of 70 % C2S (the rest taken as inert): 0.7*0.4498 = 0.3148 kg/kg.
    water = water_for_full_hydration({"C2S": 0.7, "amorphous": 0.3}, {"C2S": bal})
    assert water == pytest.approx(0.3148, abs=2e-4)


def test_pozzolanic_reaction_gains_less_solid_volume():
    # Common practice: a lime-pozzolan reaction adds roughly a third to the solid volume,
    # far less than belite hydration.  By hand (practice set): solids 1.7*74.09/2.24 +
    # 60.08/2.2 = 56.23 + 27.31 = 83.54 -> 113.74 cm3: +36 %.
    for densities in (PRACTICE, BENTZ):
        poz = reaction_balance(POZZOLANIC, AW, densities)
        assert poz.solid_volume_increase == pytest.approx(1 / 3, abs=0.06)
        assert poz.solid_volume_increase < reaction_balance(
            BELITE_HYDRATION, AW, densities).solid_volume_increase
        assert poz.ch_per_kg < 0  # portlandite is consumed


def test_csh_density_sensitivity():
    cases = csh_density_sensitivity(BELITE_HYDRATION, AW, BENTZ, [2000.0, 2110.0])
    assert cases[1].chemical_shrinkage == pytest.approx(
        reaction_balance(BELITE_HYDRATION, AW, BENTZ).chemical_shrinkage)
    # a lighter C-S-H fills more space: less shrinkage, more solid volume
    assert cases[0].chemical_shrinkage < cases[1].chemical_shrinkage
    assert cases[0].solid_volume_increase > cases[1].solid_volume_increase


@pytest.mark.parametrize("wc, alpha", [(0.4, 0.6), (0.5, 1.0), (0.6, 0.8), (0.7, 0.5)])
def test_powers_reduces_to_portland_form(wc, alpha):
    # Powers & Brownyard form for Portland cement (from memory):
    #   p = (w/c - 0.36 a)/(w/c + 0.32),  X = 0.68 a/(0.32 a + w/c)
    # with cement 3.15 g/cm3 and 0.68 cm3 of gel per g hydrated; tolerance 0.005 covers
    # the rounding of 0.36 and 0.32 (exactly 0.3625 and 0.3175 here).
    state = powers(wc, alpha, 3150.0, 0.68e-3, 1000.0)
    assert state.capillary_porosity == pytest.approx((wc - 0.36 * alpha) / (wc + 0.32), abs=0.005)
    assert state.gel_space_ratio == pytest.approx(0.68 * alpha / (0.32 * alpha + wc), abs=0.005)
    assert not state.space_limited


def test_powers_space_limit():
    # w/c 0.30: hydration stops when capillary space is filled, at
    # a = 0.30/(0.68 - 0.3175) = 0.828 (same Powers assumptions as above).
    state = powers(0.30, 1.0, 3150.0, 0.68e-3, 1000.0)
    assert state.space_limited and state.max_degree == pytest.approx(0.828, abs=1e-3)
    assert state.capillary_porosity == pytest.approx(0.0, abs=1e-12)
    assert state.gel_space_ratio == pytest.approx(1.0)


def test_powers_with_belite_bookkeeping():
    bal = reaction_balance(BELITE_HYDRATION, AW, BENTZ)
    # solid products 117.73 cm3 per 172.24 g C2S = 0.6835 cm3/g (by hand, Bentz set)
    assert bal.product_volume_per_kg * 1e3 == pytest.approx(0.6835, abs=2e-4)
    low, high = (powers(wb, 1.0, BENTZ["C2S"], bal.product_volume_per_kg, BENTZ["H"])
                 for wb in (0.45, 0.8))
    # Powers' volumes per kg of binder written out (alpha = 1): V0 = 1/rho_b + (w/b)/rho_w,
    # p = (V0 - v_p)/V0 with v_p = 6.8354e-4 m3/kg (above), Bentz C2S 3280, water 997.1:
    #   w/b 0.45: V0 = 3.04878e-4 + 4.51309e-4 = 7.56187e-4 -> p = 0.72647/7.56187 = 0.0961
    #   w/b 0.80: V0 = 3.04878e-4 + 8.02327e-4 = 11.07205e-4 -> p = 4.23665/11.07205 = 0.3826
    for state, wb, by_hand in ((low, 0.45, 0.0961), (high, 0.8, 0.3826)):
        v0 = 1 / BENTZ["C2S"] + wb / BENTZ["H"]
        p = (v0 - bal.product_volume_per_kg) / v0
        assert state.capillary_porosity == pytest.approx(p, rel=1e-9)
        assert p == pytest.approx(by_hand, abs=2e-4)
        # gel-space ratio: product volume / (product volume + capillary space)
        x = bal.product_volume_per_kg / (bal.product_volume_per_kg + p * v0)
        assert state.gel_space_ratio == pytest.approx(x, rel=1e-9)


@pytest.mark.parametrize("args, message", [
    ((0.5, 1.2, 3150.0, 0.68e-3, 1000.0), "degree of hydration"),
    ((0.0, 0.5, 3150.0, 0.68e-3, 1000.0), "w/b must be a positive"),
    ((0.5, 0.5, -1.0, 0.68e-3, 1000.0), "binder density"),
    ((0.5, float("nan"), 3150.0, 0.68e-3, 1000.0), "degree of hydration"),
])
def test_powers_bad_input(args, message):
    with pytest.raises(ChemistryInputError, match=message):
        powers(*args)


def test_density_set_must_be_complete():
    with pytest.raises(ChemistryInputError, match="'CH'"):
        reaction_balance(BELITE_HYDRATION, AW, {k: v for k, v in BENTZ.items() if k != "CH"})
    with pytest.raises(ChemistryInputError, match="mass fraction"):
        water_for_full_hydration({"C2S": 1.5}, {})


# --- every field of a balance, the refusals whole, and the edges of Powers' model -----------

def _pt(formula):
    # molar mass in kg/mol from periodictable (reference library; its own atomic weights)
    return periodictable.formula(formula).mass / 1000.0


def test_every_field_of_the_belite_balance_against_periodictable():
    # volumes per mole of reaction (m³/mol) = n·M/ρ, M from periodictable, ρ the Bentz set
    # (signed: reactants negative); relative = |V|/V(C2S); densities as given
    m = {"C2S": _pt("Ca2SiO4"), "H": _pt("H2O"), "C1.7SH4": _pt("(CaO)1.7(SiO2)(H2O)4"),
         "CH": _pt("Ca(OH)2")}
    v = {"C2S": -m["C2S"] / 3280.0, "H": -4.3 * m["H"] / 997.1,
         "C1.7SH4": m["C1.7SH4"] / 2110.0, "CH": 0.3 * m["CH"] / 2240.0}
    bal = reaction_balance(BELITE_HYDRATION, AW, BENTZ)
    assert bal.reaction == "C2S + 4.3 H -> C1.7-S-H4 + 0.3 CH"
    assert bal.volumes == pytest.approx(v, rel=1e-4)
    assert bal.relative == pytest.approx({k: abs(x) / -v["C2S"] for k, x in v.items()}, rel=1e-4)
    v_in, v_out = -v["C2S"] - v["H"], v["C1.7SH4"] + v["CH"]
    assert bal.chemical_shrinkage == pytest.approx((v_in - v_out) / v_in, rel=1e-4)
    assert bal.solid_volume_increase == pytest.approx((v_out + v["C2S"]) / -v["C2S"], rel=1e-4)
    assert bal.product_volume_per_kg == pytest.approx(v_out / m["C2S"], rel=1e-4)
    assert bal.densities == {"C2S": 3280.0, "H": 997.1, "C1.7SH4": 2110.0, "CH": 2240.0}


def test_pozzolanic_balance_per_kg_of_its_first_reactant():
    # the reference phase is the first reactant, 1.7 CH: per kg of lime, water
    # 2.3·M(H2O)/(1.7·M(CH)) = 2.3 × 18.015/(1.7 × 74.093) = 0.3290 kg/kg; lime consumed −1 kg/kg;
    # solids 1.7 CH + S in, C-S-H out (water is not a solid)
    m_ch, m_s, m_h = _pt("Ca(OH)2"), _pt("SiO2"), _pt("H2O")
    m_csh = _pt("(CaO)1.7(SiO2)(H2O)4")
    bal = reaction_balance(POZZOLANIC, AW, BENTZ)
    assert bal.water_per_kg == pytest.approx(2.3 * m_h / (1.7 * m_ch), rel=1e-4)
    assert bal.water_per_kg == pytest.approx(0.3290, abs=1e-4)
    assert bal.ch_per_kg == pytest.approx(-1.0, rel=1e-12)
    solid_in = 1.7 * m_ch / 2240.0 + m_s / 2200.0
    solid_out = m_csh / 2110.0
    v_in = solid_in + 2.3 * m_h / 997.1
    assert bal.solid_volume_increase == pytest.approx((solid_out - solid_in) / solid_in, rel=1e-4)
    assert bal.chemical_shrinkage == pytest.approx((v_in - solid_out) / v_in, rel=1e-4)
    assert bal.product_volume_per_kg == pytest.approx(solid_out / (1.7 * m_ch), rel=1e-4)
    assert bal.relative["CH"] == pytest.approx(1.0, rel=1e-12)


def test_density_switch_changes_only_the_csh_density():
    # the C-S-H density of a sensitivity case replaces that of the set, the others kept: the
    # case at Bentz's own 2110 kg/m³ is the Bentz balance; at 2000 kg/m³ the C-S-H volume is
    # M/2000 (periodictable), the rest as in the Bentz set
    cases = csh_density_sensitivity(BELITE_HYDRATION, AW, BENTZ, [2000.0, 2110.0])
    assert [c.csh_density for c in cases] == [2000.0, 2110.0]
    v_c2s, v_h = _pt("Ca2SiO4") / 3280.0, 4.3 * _pt("H2O") / 997.1
    v_ch = 0.3 * _pt("Ca(OH)2") / 2240.0
    for case, rho in zip(cases, (2000.0, 2110.0)):
        v_out = _pt("(CaO)1.7(SiO2)(H2O)4") / rho + v_ch
        assert case.chemical_shrinkage == pytest.approx((v_c2s + v_h - v_out) / (v_c2s + v_h),
                                                        rel=1e-4)
        assert case.solid_volume_increase == pytest.approx((v_out - v_c2s) / v_c2s, rel=1e-4)


def test_unbalanced_reaction_names_the_elements_off():
    # C2S + 4 H -> C1.7SH4 + 0.3 CH by hand: H 8 in, 8 + 0.6 out (−0.6); O 4 + 4 in,
    # 7.7 + 0.6 out (−0.3); Ca 2 in, 1.7 + 0.3 out and Si 1 each side (balanced, not named)
    import ast
    wrong = Reaction("C2S + 4 H -> C1.7SH4 + 0.3 CH", (("C2S", 1.0), ("H", 4.0)),
                     (("C1.7SH4", 1.0), ("CH", 0.3)))
    with pytest.raises(ChemistryInputError) as err:
        check_balanced(wrong, AW)
    head = "reaction 'C2S + 4 H -> C1.7SH4 + 0.3 CH' does not balance: "
    assert str(err.value).startswith(head)
    assert ast.literal_eval(str(err.value)[len(head):]) == pytest.approx({"H": -0.6, "O": -0.3},
                                                                         abs=1e-9)


def test_unknown_species_is_refused_whole():
    odd = Reaction("C3S + 3 H -> ...", (("C3S", 1.0), ("H", 3.0)), (("CH", 1.0),))
    with pytest.raises(ChemistryInputError) as err:
        check_balanced(odd, AW)
    assert str(err.value) == "unknown species 'C3S': known are C2S, H, CH, C1.7SH4, S"


@pytest.mark.parametrize("rho", [None, 0.0, -2240.0, float("nan"), float("inf")])
def test_density_set_refusals_whole(rho):
    dens = {k: v for k, v in BENTZ.items() if k != "CH"}
    if rho is not None:
        dens["CH"] = rho
    with pytest.raises(ChemistryInputError) as err:
        reaction_balance(BELITE_HYDRATION, AW, dens)
    assert str(err.value) == "the density set needs a positive density for 'CH'"


@pytest.mark.parametrize("fraction", [1.5, -0.1, float("nan")])
def test_mass_fraction_refusal_whole(fraction):
    with pytest.raises(ChemistryInputError) as err:
        water_for_full_hydration({"C2S": fraction}, {})
    assert str(err.value) == f"C2S must be a mass fraction 0-1, got {fraction!r}"


def test_mass_fractions_at_the_edges_are_taken():
    # 0 and 1 are mass fractions: pure C2S needs its whole water per kg, none needs none
    bal = reaction_balance(BELITE_HYDRATION, AW, BENTZ)
    w = 4.3 * _pt("H2O") / _pt("Ca2SiO4")                      # periodictable
    assert water_for_full_hydration({"C2S": 1.0}, {"C2S": bal}) == pytest.approx(w, rel=1e-4)
    assert water_for_full_hydration({"C2S": 0.0, "CH": 1.0}, {"C2S": bal}) == 0.0
    # two reactive phases add: 0.6 C2S + 0.3 lime (pozzolanic, 0.3290 kg/kg by hand above)
    poz = reaction_balance(POZZOLANIC, AW, BENTZ)
    both = water_for_full_hydration({"C2S": 0.6, "CH": 0.3}, {"C2S": bal, "CH": poz})
    assert both == pytest.approx(0.6 * w + 0.3 * 2.3 * _pt("H2O") / (1.7 * _pt("Ca(OH)2")),
                                 rel=1e-4)


@pytest.mark.parametrize("args, message", [
    ((0.5, 1.2, 3150.0, 0.68e-3, 1000.0), "degree of hydration must lie in 0-1, got 1.2"),
    ((0.5, -0.1, 3150.0, 0.68e-3, 1000.0), "degree of hydration must lie in 0-1, got -0.1"),
    ((0.5, float("nan"), 3150.0, 0.68e-3, 1000.0), "degree of hydration must lie in 0-1, got nan"),
    ((0.0, 0.5, 3150.0, 0.68e-3, 1000.0), "w/b must be a positive number, got 0.0"),
    ((float("inf"), 0.5, 3150.0, 0.68e-3, 1000.0), "w/b must be a positive number, got inf"),
    ((0.5, 0.5, -1.0, 0.68e-3, 1000.0), "binder density must be a positive number, got -1.0"),
    ((0.5, 0.5, 3150.0, 0.0, 1000.0), "product volume must be a positive number, got 0.0"),
    ((0.5, 0.5, 3150.0, 0.68e-3, 0.0), "water density must be a positive number, got 0.0"),
])
def test_powers_refusals_whole(args, message):
    with pytest.raises(ChemistryInputError) as err:
        powers(*args)
    assert str(err.value) == message


def test_powers_edges_by_hand():
    # binder 2000 kg/m³ (v_b = 5e-4 m³/kg), products 1e-3 m³/kg: each kg reacted grows by
    # 5e-4 m³; w/b 0.25 with water 1000 kg/m³ (v_w = 2.5e-4): space runs out at α = 0.5
    at = powers(0.25, 0.5, 2000.0, 1e-3, 1000.0)
    assert at == type(at)(0.0, 1.0, 0.5, False)         # on the limit: not beyond it
    beyond = powers(0.25, 0.6, 2000.0, 1e-3, 1000.0)
    assert beyond == type(at)(0.0, 1.0, 0.5, True)      # held at α = 0.5, flagged
    # α = 0.25: gel 2.5e-4, capillary 5e-4 + 2.5e-4 − 0.75·5e-4 − 2.5e-4 = 1.25e-4;
    # p = 1.25e-4/7.5e-4 = 1/6, X = 2.5e-4/3.75e-4 = 2/3
    half = powers(0.25, 0.25, 2000.0, 1e-3, 1000.0)
    assert (half.capillary_porosity, half.gel_space_ratio) == pytest.approx((1 / 6, 2 / 3),
                                                                            rel=1e-12)
    assert (half.max_degree, half.space_limited) == (0.5, False)
    # α = 0: no gel; the capillary space is the water, p = 2.5e-4/7.5e-4 = 1/3, X = 0
    none = powers(0.25, 0.0, 2000.0, 1e-3, 1000.0)
    assert (none.capillary_porosity, none.gel_space_ratio) == pytest.approx((1 / 3, 0.0),
                                                                            abs=1e-12)
    # products taking no more room than the binder (growth 0, then −1e-4 m³/kg): never
    # space-limited, max degree 1; α = 1 with v_p = 4e-4: capillary 5e-4 + 5e-4 − 4e-4 =
    # 6e-4 of V0 = 1e-3 (w/b 0.5): p = 0.6, X = 4e-4/1e-3 = 0.4
    flat = powers(0.5, 1.0, 2000.0, 5e-4, 1000.0)
    assert (flat.max_degree, flat.space_limited) == (1.0, False)
    assert flat.capillary_porosity == pytest.approx(0.5, rel=1e-12)
    shrinking = powers(0.5, 1.0, 2000.0, 4e-4, 1000.0)
    assert (shrinking.max_degree, shrinking.space_limited) == (1.0, False)
    assert (shrinking.capillary_porosity, shrinking.gel_space_ratio) == pytest.approx(
        (0.6, 0.4), rel=1e-12)
    # plenty of water: v_w/growth = 1e-3/5e-4 = 2 is capped at a degree of 1
    wet = powers(1.0, 1.0, 2000.0, 1e-3, 1000.0)
    assert (wet.max_degree, wet.space_limited) == (1.0, False)
    # α = 1: capillary 5e-4 + 1e-3 − 1e-3 = 5e-4 of 1.5e-3: p = 1/3, X = 1e-3/1.5e-3 = 2/3
    assert (wet.capillary_porosity, wet.gel_space_ratio) == pytest.approx((1 / 3, 2 / 3),
                                                                          rel=1e-12)


def test_ratios_do_not_depend_on_the_density_unit():
    # dimensional analysis: the densities in t/m³ (each / 1000; water 0.9971, under 1) give
    # volumes 1000 times larger, and the same unit-free ratios
    kg = reaction_balance(BELITE_HYDRATION, AW, BENTZ)
    t = reaction_balance(BELITE_HYDRATION, AW, {k: v / 1000 for k, v in BENTZ.items()})
    assert t.volumes == pytest.approx({k: 1000 * v for k, v in kg.volumes.items()}, rel=1e-12)
    assert (t.chemical_shrinkage, t.solid_volume_increase) == pytest.approx(
        (0.0958, 1.242), abs=0.001)                           # as in the Bentz test above
    assert t.relative == pytest.approx(kg.relative, rel=1e-12)


def test_a_reaction_consuming_no_water():
    # the pozzolanic reaction run backwards (C-S-H taken apart into lime, silica and water,
    # written here only to test the bookkeeping): no water is consumed, so the water per kg
    # is 0; lime formed per kg of C-S-H = 1.7·M(CH)/M(C1.7SH4) (periodictable)
    back = Reaction("C1.7-S-H4 -> 1.7 CH + S + 2.3 H", (("C1.7SH4", 1.0),),
                    (("CH", 1.7), ("S", 1.0), ("H", 2.3)))
    bal = reaction_balance(back, AW, BENTZ)
    assert bal.water_per_kg == 0.0
    assert bal.ch_per_kg == pytest.approx(1.7 * _pt("Ca(OH)2") / _pt("(CaO)1.7(SiO2)(H2O)4"),
                                          rel=1e-4)
