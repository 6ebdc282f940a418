"""`knockproof schema`: print the JSON Schema of the building file (for editors and other tools)."""

from __future__ import annotations


def command() -> int:
    """Print the JSON Schema of the building file."""
    import json

    from knockproof.cli.output import write_text
    from knockproof.model.schema import building_file_schema

    write_text(json.dumps(building_file_schema(), indent=2, sort_keys=True))
    return 0
