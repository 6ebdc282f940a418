"""knockproof: water-hammer screening for building water-supply piping."""

__version__ = "0.1.0"
