"""Material and stock tables: sources resolve, values parse, published rows are intact."""

import shutil

import pytest

from cutplan.materials import MaterialError, load_library, packaged_dir

INCH = 0.0254


@pytest.fixture(scope="module")
def lib():
    return load_library()


def test_required_materials_are_present(lib):
    needed = {"aluminum-6061-t6", "aluminum-6063-t5", "copper-c12200", "brass-c26000", "steel-1018",
              "steel-emt", "stainless-304", "titanium-grade2", "pvc-rigid", "acrylic", "glass-soda-lime",
              "bamboo"}
    assert needed <= set(lib.materials)
    woods = [m for m in lib.materials.values() if m.shear_ratio and m.name != "bamboo"]
    assert len(woods) >= 5


def test_every_value_has_a_known_source_and_kind(lib):
    for m in lib.materials.values():
        props = dict(m.provenance)
        for key in ("modulus", "density"):
            assert props[key].source in lib.sources, (m.name, key)
            assert props[key].kind


def test_material_fingerprint_catches_accidental_edits(lib):
    # sum of moduli [GPa] and densities [kg/m3] over the shipped materials (update on purpose)
    assert len(lib.materials) == 18
    assert sum(m.modulus for m in lib.materials.values()) / 1e9 == pytest.approx(1239.40, abs=0.01)
    assert sum(m.density for m in lib.materials.values()) == pytest.approx(61665, abs=1)


def test_aluminium_6061_t6_typical_values(lib):
    # Aluminum Association typical values (Aluminum Standards and Data; sources.toml aa-typical):
    # E 68.9 GPa (10,000 ksi), 2700 kg/m3, nu 0.33
    m = lib.materials["aluminum-6061-t6"]
    assert (m.modulus, m.density, m.poisson) == (68.9e9, 2700.0, 0.33)
    assert m.shear_modulus_for("timoshenko") == pytest.approx(68.9e9 / 2.66)


def test_wood_bending_modulus_is_raised_for_the_shear_corrected_model(lib):
    # Wood Handbook 2010 Table 5-3a: sugar maple MOE 12.6 GPa (static bending); Table 5-1
    # G_LR/E_L = 0.111; the +10 % to true E_L is the Table 5-3a footnote (from memory)
    m = lib.materials["maple-sugar"]
    assert m.modulus_for("slender") == pytest.approx(12.6e9)
    assert m.modulus_for("timoshenko") == pytest.approx(13.86e9)
    assert m.shear_modulus_for("timoshenko") == pytest.approx(0.111 * 13.86e9)


@pytest.mark.parametrize(
    ("name", "outer_in", "wall_in"),
    [
        # ASTM B88 dimension tables (sources.toml astm-b88; two agreeing reproductions)
        ("copper-l-1/2", 0.625, 0.040), ("copper-k-3/4", 0.875, 0.065), ("copper-m-1", 1.125, 0.035),
        # ASTM D1785 Table 1 (sources.toml astm-d1785)
        ("pvc-sch40-1/2", 0.840, 0.109), ("pvc-sch40-2", 2.375, 0.154), ("pvc-sch80-1", 1.315, 0.179),
        ("pvc-sch80-4", 4.500, 0.337),
        # ANSI C80.3 nominal EMT dimensions (sources.toml ansi-c80-3, via the Steel Tube Institute)
        ("emt-1/2", 0.706, 0.042), ("emt-3/4", 0.922, 0.049), ("emt-2", 2.197, 0.065),
    ],
)
def test_stock_rows_match_the_standards(lib, name, outer_in, wall_in):
    s = lib.stock[name].section
    assert s.outer == pytest.approx(outer_in * INCH)
    assert s.wall == pytest.approx(wall_in * INCH)


def test_pvc_bore_is_smaller_than_od_minus_two_minimum_walls(lib):
    # ASTM D1785 Table 1: walls are minimums, and the average ID of 1/2 in Sch 40 is 0.602 in,
    # below OD - 2 x minimum wall = 0.622 in
    s = lib.stock["pvc-sch40-1/2"].section
    assert 0.600 * INCH < 2 * s.air_radius < 0.622 * INCH


def test_user_folder_adds_and_overrides(tmp_path):
    (tmp_path / "mine.toml").write_text(
        '[my-steel]\nmodulus = "205 GPa"\ndensity = "7850 kg/m3"\n'
        '[aluminum-6061-t6]\nmodulus = { value = "70 GPa", kind = "measured", spread = "0.5 %" }\ndensity = "2700 kg/m3"\n',
        encoding="utf-8")
    lib = load_library([tmp_path])
    assert lib.materials["my-steel"].modulus == 205e9
    assert lib.materials["aluminum-6061-t6"].modulus == 70e9
    assert lib.materials["aluminum-6061-t6"].modulus_spread == pytest.approx(0.005)


@pytest.mark.parametrize(
    ("text", "key"),
    [
        ('[x]\nmodulus = "70 GPa"\n', "x.density"),
        ('[x]\nmodulus = "70 parsecs"\ndensity = "1 kg/m3"\n', "x.modulus.value"),
        ('[x]\nmodulus = "-70 GPa"\ndensity = "1 kg/m3"\n', "x.modulus.value"),
        ('[x]\nmodulus = "70 GPa"\ndensity = "1 kg/m3"\ncolour = "red"\n', "x.colour"),
        ('[x]\nmodulus = { value = "70 GPa", kind = "rumour" }\ndensity = "1 kg/m3"\n', "x.modulus.kind"),
        ('[x]\nmodulus = "70 GPa"\ndensity = "1 kg/m3"\npoisson = 0.7\n', "x.poisson"),
        ("not toml at all [", "(file)"),
    ],
)
def test_bad_user_tables_name_file_and_key(tmp_path, text, key):
    (tmp_path / "bad.toml").write_text(text, encoding="utf-8")
    with pytest.raises(MaterialError) as info:
        load_library([tmp_path])
    assert info.value.key == key
    assert "bad.toml" in str(info.value)


def test_installed_tables_found_from_a_copy(tmp_path):
    # the wheel ships materials/ as cutplan/_materials; simulate that layout
    copy = tmp_path / "_materials"
    shutil.copytree(packaged_dir(), copy)
    lib = load_library([copy], include_packaged=False)
    assert "pvc-sch40-2" in lib.stock


def test_wheel_ships_the_tables_when_installed():
    # CI installs the package non-editably: the wheel must carry materials/ as cutplan/_materials
    from importlib import metadata

    try:
        files = [str(f) for f in (metadata.files("cutplan") or [])]
    except metadata.PackageNotFoundError:
        pytest.skip("cutplan is not installed")
    if not any(f.startswith("cutplan/") and f.endswith(".py") for f in files):
        pytest.skip("editable install: the source tree's materials/ is used")
    for name in ("metals.toml", "woods.toml", "sources.toml", "astm_b88.toml", "astm_d1785.toml"):
        assert f"cutplan/_materials/{name}" in files
    assert any(f.startswith("cutplan/_examples/") for f in files)


# Each load reads the files again; a file's parse is kept only while its bytes stay the same. The
# oracle for these is the table text written here (the value read back is the one written).
GARDEN = '[garden-steel]\nmodulus = "200 GPa"\ndensity = "7850 kg/m3"\n'


def test_an_edited_table_is_read_again_even_at_the_same_size_and_moment(tmp_path):
    table = tmp_path / "garden.toml"
    table.write_text(GARDEN, encoding="utf-8")
    assert load_library([tmp_path]).materials["garden-steel"].modulus == 200e9
    edited = GARDEN.replace("200 GPa", "190 GPa")
    assert len(edited) == len(GARDEN)  # same size, written within the same clock tick
    table.write_text(edited, encoding="utf-8")
    assert load_library([tmp_path]).materials["garden-steel"].modulus == 190e9
    table.write_text(GARDEN, encoding="utf-8")
    assert load_library([tmp_path]).materials["garden-steel"].modulus == 200e9


def test_a_caller_changing_its_library_does_not_change_the_next_load(tmp_path):
    (tmp_path / "garden.toml").write_text(GARDEN, encoding="utf-8")
    first = load_library([tmp_path])
    first.materials.clear()
    first.stock.pop("pvc-sch40-1/2")
    first.sources["aa-typical"]["citation"] = "changed by a caller"
    first.sources.clear()
    again = load_library([tmp_path])
    assert again.materials["garden-steel"].modulus == 200e9
    assert "aluminum-6061-t6" in again.materials and "pvc-sch40-1/2" in again.stock
    assert again.sources["aa-typical"]["citation"] != "changed by a caller"
    assert again.sources["aa-typical"]["citation"] == load_library().sources["aa-typical"]["citation"]


def test_a_broken_table_is_named_on_every_load(tmp_path):
    (tmp_path / "bad.toml").write_text('[x]\nmodulus = "70 parsecs"\ndensity = "1 kg/m3"\n', encoding="utf-8")
    for _ in range(2):
        with pytest.raises(MaterialError) as info:
            load_library([tmp_path])
        assert info.value.key == "x.modulus.value" and "bad.toml" in str(info.value)


def test_a_table_is_checked_again_against_the_sources_it_is_loaded_with(tmp_path):
    (tmp_path / "sources.toml").write_text('[garden-notes]\ncitation = "our own bench notes"\n', encoding="utf-8")
    (tmp_path / "garden.toml").write_text(
        '[garden-steel]\nmodulus = { value = "200 GPa", source = "garden-notes", kind = "measured" }\n'
        'density = "7850 kg/m3"\n', encoding="utf-8")
    assert load_library([tmp_path]).materials["garden-steel"].modulus == 200e9
    (tmp_path / "sources.toml").unlink()
    with pytest.raises(MaterialError) as info:
        load_library([tmp_path])
    assert info.value.key == "garden-steel.modulus.source" and "garden.toml" in str(info.value)
