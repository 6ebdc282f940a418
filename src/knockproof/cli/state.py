"""Process-wide CLI state (the --debug flag) and the wrapper that maps errors to exit status."""

from __future__ import annotations

from collections.abc import Callable
from typing import Any

DEBUG = False


def run_app(app: Callable[..., Any]) -> int:
    """Run the typer app; turn knockproof errors into a clean message and exit status 2."""
    from knockproof.errors import KnockproofError

    try:
        rv = app(standalone_mode=False)
        if isinstance(rv, int) and not isinstance(rv, bool):
            return rv if rv >= 0 else 2
    except KnockproofError as e:
        if DEBUG:
            raise
        from knockproof.cli.output import error

        error(str(e) if len(str(e).splitlines()) == 1 else _many(e))
        return e.exit_status
    except SystemExit as e:
        code = e.code if isinstance(e.code, int) else (0 if e.code is None else 2)
        return code if code >= 0 else 2
    except KeyboardInterrupt:
        return 2
    except Exception as e:  # noqa: BLE001 - click usage errors and anything unexpected
        # typer bundles its own click: recognise its exceptions by shape, not by class.
        if type(e).__name__ == "Abort":
            return 2
        if hasattr(e, "show") and hasattr(e, "exit_code"):
            e.show()
            return 2
        if DEBUG:
            raise
        from knockproof.cli.output import error

        error(
            f"internal error: {type(e).__name__}: {e} (run with --debug for a traceback, and "
            "please report it)"
        )
        return 2
    return 0


def _many(e: Exception) -> str:
    lines = str(e).splitlines()
    return f"{len(lines)} problems found:\n" + "\n".join("  " + x for x in lines)


def exit_with(code: int) -> None:
    raise SystemExit(code)
