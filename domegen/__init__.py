"""domegen: accurate skies and eclipses rendered as fisheye dome-master frames."""

__version__ = "0.1.0"
