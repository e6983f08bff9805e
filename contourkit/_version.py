"""The package version (lowest layer: read by the front door, the command line and run fingerprints)."""
__version__ = "0.1.0"
