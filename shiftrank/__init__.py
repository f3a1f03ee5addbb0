"""shiftrank: rank candidate structures against an observed 13C spectrum."""
__version__ = "0.1.0"
