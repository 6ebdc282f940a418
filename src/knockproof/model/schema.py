"""The building file's structure, as pydantic models of the raw TOML (before units and templates).

These models check shape and types and forbid unknown keys (a misspelt key is an error, not silently
ignored). Quantities stay as written (a number or a string with a unit); the loader converts them to SI.
``building_file_schema()`` gives the JSON Schema that ``knockproof schema`` prints.
"""

from __future__ import annotations

from typing import Annotated, Any, Literal

from pydantic import BaseModel, ConfigDict, Field, StrictFloat, StrictInt, StrictStr

Quantity = Annotated[
    StrictStr | StrictFloat | StrictInt,
    Field(
        description="A number in the building's unit system, or a string with a unit: '25 ft', '60 psi'."
    ),
]
Name = Annotated[StrictStr, Field(min_length=1, max_length=200)]
SideName = Literal["cold", "hot"]


class _Strict(BaseModel):
    model_config = ConfigDict(extra="forbid", populate_by_name=True)


class BuildingSection(_Strict):
    """The ``[building]`` table."""

    name: Annotated[StrictStr, Field(max_length=200)] = Field(description="The building's name.")
    units: Literal["us", "si"] = Field(
        "us",
        description="Unit system of bare numbers and of reports: 'us' (ft, psi, gpm, degF, in3) "
        "or 'si' (m, kPa, L/s, degC, L).",
    )
    cold_water_temperature: Quantity | None = Field(
        None, description="Cold water temperature (default 15 degC / 59 degF)."
    )
    hot_water_temperature: Quantity | None = Field(
        None, description="Hot water temperature (default 60 degC / 140 degF)."
    )
    profile: Name | None = Field(
        None, description="Rule profile to apply (a bundled profile name); default by unit system."
    )
    notes: Annotated[StrictStr, Field(max_length=5000)] = Field("", description="Free text.")


class Defaults(_Strict):
    """The ``[defaults]`` table: values every pipe and fixture takes unless it says otherwise."""

    material: Name | None = Field(None, description="Pipe material key, e.g. 'copper-L'.")
    restraint: Literal["anchored", "upstream", "joints"] = Field(
        "anchored", description="How pipes are restrained against axial movement."
    )
    fittings: Quantity | None = Field(
        None, description="Allowance for fittings: a percentage of length ('25%') or a length."
    )
    use: Literal["private", "public"] = Field(
        "private", description="Fixture use for fixture units."
    )


class SupplyIn(_Strict):
    """A ``[[supply]]`` entry: a point where water enters a tree."""

    node: Name
    kind: Literal["street", "booster", "prv-outlet", "heater-outlet", "tank"] = "street"
    side: SideName = "cold"
    static_pressure: Quantity | None = Field(
        None,
        description="Gauge static pressure at the node with no flow, the highest the supply "
        "holds (not needed for a heater outlet with fed_from). Surge, static and rating checks "
        "use it.",
    )
    minimum_pressure: Quantity | None = Field(
        None,
        description="Gauge pressure at the node at peak demand, the lowest the supply holds "
        "(e.g. the main's pressure at peak hour). Flowing-pressure checks use it; when absent "
        "they use static_pressure.",
    )
    elevation: Quantity = Field(0, description="Elevation of the node.")
    fed_from: Name | None = Field(
        None, description="For a heater outlet: the cold-side node that feeds the heater."
    )


class PipeIn(_Strict):
    """A ``[[pipe]]`` entry: a run of pipe between two nodes."""

    id: Name
    from_: Name = Field(alias="from", description="Upstream node (towards the supply).")
    to: Name = Field(description="Downstream node.")
    length: Quantity
    size: StrictStr | StrictFloat | StrictInt = Field(
        description="Nominal size as in the trade: '1/2', '3/4', '1-1/4', or 'DN20'."
    )
    material: Name | None = None
    rise: Quantity = Field(0, description="Elevation gain from 'from' to 'to' (negative = drop).")
    side: SideName | None = Field(None, description="Optional; checked against the supply's side.")
    fittings: Quantity | None = None
    restraint: Literal["anchored", "upstream", "joints"] | None = None
    label: Annotated[StrictStr, Field(max_length=200)] = ""


class FixtureIn(_Strict):
    """A ``[[fixture]]`` entry."""

    id: Name
    kind: Name
    cold: Name | None = Field(None, description="Node of the cold tree its cold valve sits on.")
    hot: Name | None = Field(None, description="Node of the hot tree its hot valve sits on.")
    node: Name | None = Field(
        None,
        description="Shorthand for a fixture that draws one side: the side of this node's tree.",
    )
    flow: Quantity | None = Field(
        None,
        description="Override of the flow through a valve as it closes: used as given, or, with "
        "flow_pressure, scaled to the node's static pressure as an orifice (Q ~ sqrt(p)).",
    )
    flow_pressure: Quantity | None = Field(
        None, description="The pressure at which 'flow' is rated (e.g. a maker's '1.5 gpm at 60 psi')."
    )
    closure_time: Quantity | None = Field(None, description="Override of the valve closure time.")
    valve: (
        Literal["solenoid", "self-closing", "lever", "flush-valve", "manual", "sensor"] | None
    ) = None
    use: Literal["private", "public"] | None = None
    continuous: bool = Field(
        False,
        description="A continuous load (e.g. a hose bibb or process water left running): its flow "
        "is added to the design flow of every pipe upstream instead of its fixture units.",
    )
    label: Annotated[StrictStr, Field(max_length=200)] = ""


class ArrestorIn(_Strict):
    """An ``[[arrestor]]`` entry: an arrestor shown on the designer's drawings."""

    id: Name | None = None
    node: Name
    side: SideName | None = Field(None, description="Optional; checked against the node's tree.")
    size: Literal["AA", "A", "B", "C", "D", "E", "F"] | None = Field(
        None, description="Size class of the published arrestor standard."
    )
    gas_volume: Quantity | None = None


class DeviceIn(_Strict):
    """A ``[[device]]`` entry: PRV, check or backflow valve, expansion tank, water heater."""

    id: Name
    kind: Literal["prv", "check-valve", "backflow-preventer", "expansion-tank", "water-heater"]
    node: Name
    setting: Quantity | None = Field(None, description="A PRV's outlet pressure setting.")
    volume: Quantity | None = Field(None, description="An expansion tank's volume.")
    rating: Quantity | None = Field(
        None, description="The device's rated working pressure (gauge), from its maker."
    )


class PlaceIn(_Strict):
    """A ``[[place]]`` entry (top level or inside a template): put a template down, once or many times."""

    template: Name
    for_: dict[Name, StrictStr | list[StrictStr | StrictInt]] = Field(
        default_factory=dict,
        alias="for",
        description="Loop variables: '2..24' (whole numbers), 'A..J' (letters) or a list.",
    )
    with_: dict[Name, StrictStr | StrictInt] = Field(
        default_factory=dict, alias="with", description="Variables set for this placement."
    )
    label: Annotated[StrictStr, Field(max_length=200)] = ""


class TemplateIn(_Strict):
    """A ``[[template]]`` entry: a group of items with {variable} names, placed with ``[[place]]``."""

    name: Name
    pipe: list[PipeIn] = Field(default_factory=list)
    fixture: list[FixtureIn] = Field(default_factory=list)
    arrestor: list[ArrestorIn] = Field(default_factory=list)
    device: list[DeviceIn] = Field(default_factory=list)
    place: list[PlaceIn] = Field(default_factory=list)


class BuildingFile(_Strict):
    """A whole building file."""

    model_config = ConfigDict(
        extra="forbid",
        populate_by_name=True,
        title="knockproof building file",
        json_schema_extra={"description": "A building's water-supply tree for knockproof."},
    )

    building: BuildingSection
    defaults: Defaults = Field(default_factory=Defaults)  # type: ignore[arg-type]
    supply: list[SupplyIn] = Field(min_length=1)
    pipe: list[PipeIn] = Field(default_factory=list)
    fixture: list[FixtureIn] = Field(default_factory=list)
    arrestor: list[ArrestorIn] = Field(default_factory=list)
    device: list[DeviceIn] = Field(default_factory=list)
    template: list[TemplateIn] = Field(default_factory=list)
    place: list[PlaceIn] = Field(default_factory=list)


def building_file_schema() -> dict[str, Any]:
    """JSON Schema of the building file (draft 2020-12), for editors and other tools."""
    schema = BuildingFile.model_json_schema(by_alias=True)
    schema["$schema"] = "https://json-schema.org/draft/2020-12/schema"
    return schema
