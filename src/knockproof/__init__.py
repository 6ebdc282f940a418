"""knockproof: water-hammer screening for building water-supply piping."""

__version__ = "0.1.0"


def analyze(path, simultaneous=False):  # type: ignore[no-untyped-def]
    """Load a building file and screen it; see :func:`knockproof.analysis.run.analyze`."""
    from knockproof.analysis.run import analyze as _analyze

    return _analyze(path, simultaneous=simultaneous)
