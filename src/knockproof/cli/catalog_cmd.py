"""`knockproof catalog`: list pipe materials and sizes, fixture kinds, arrestor classes (and rules)."""

from __future__ import annotations

import typer


def command(
    section: str = typer.Argument(
        "all", help="materials, sizes, fixtures, arrestors or all.", show_default=True
    ),
    material: str | None = typer.Option(None, "--material", help="Sizes of this material only."),
    units: str = typer.Option("us", "--units", help="us or si."),
) -> int:
    """List what the catalogues hold."""
    from rich.table import Table

    from knockproof import catalog
    from knockproof.cli.output import out
    from knockproof.errors import UsageError
    from knockproof.model.units import fmt

    known = ("materials", "sizes", "fixtures", "arrestors", "all")
    if section not in known:
        raise UsageError(f"catalog: expected one of {', '.join(known)}, found '{section}'")
    if units not in ("us", "si"):
        raise UsageError(f"--units: expected us or si, found '{units}'")
    console = out()
    if section in ("materials", "all"):
        t = Table(title="Pipe materials", title_justify="left", show_edge=False)
        for c in ("key", "name", "modulus at 20 °C", "Poisson", "roughness"):
            t.add_column(c)
        for m in catalog.materials():
            t.add_row(
                m.key,
                m.name,
                f"{m.elastic_modulus_pa(20.0) / 1e9:.3g} GPa",
                f"{m.poisson_ratio:.2f}",
                f"{m.roughness_m * 1e6:.1f} µm",
            )
        console.print(t)
    if section in ("sizes", "all"):
        keys = [material] if material else [m.key for m in catalog.materials()]
        for key in keys:
            try:
                rows = catalog.sizes(key)
            except KeyError as e:
                raise UsageError(str(e.args[0])) from None
            t = Table(title=f"Sizes: {key}", title_justify="left", show_edge=False)
            for c in ("nominal", "outside", "wall", "inside", "rating"):
                t.add_column(c, justify="right")
            for s in rows:
                t.add_row(
                    s.nominal,
                    fmt(s.outside_diameter_m, "diameter", units, 3),
                    fmt(s.wall_m, "diameter", units, 3),
                    fmt(s.inside_diameter_m, "diameter", units, 3),
                    fmt(s.pressure_rating_pa, "pressure", units, 0),
                )
            console.print(t)
    if section in ("fixtures", "all"):
        t = Table(title="Fixture kinds", title_justify="left", show_edge=False)
        for c in ("key", "sides", "rated flow", "valve", "closure", "quick", "WSFU priv/pub"):
            t.add_column(c, no_wrap=c == "key")
        for k in catalog.fixture_kinds():
            t.add_row(
                k.key,
                "+".join(k.sides),
                f"{fmt(k.rated_flow_m3_per_s, 'flow', units, 2)} at "
                f"{fmt(k.rated_pressure_pa, 'pressure', units, 0)}",
                k.valve,
                fmt(k.closure_time_s, "time", units, 0),
                "yes" if k.quick_closing else "no",
                f"{k.wsfu_private[2]:g}/{k.wsfu_public[2]:g}",
            )
        console.print(t)
    if section in ("arrestors", "all"):
        t = Table(title="Arrestor size classes", title_justify="left", show_edge=False)
        for c in ("class", "fixture units", "source"):
            t.add_column(c)
        for a in catalog.arrestor_classes():
            t.add_row(a.symbol, f"{a.fixture_units_min:g}–{a.fixture_units_max:g}", a.source)
        console.print(t)
    return 0
