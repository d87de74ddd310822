"""Perifocal: orbital elements in, correct orbit pictures out.

The import package is ``viewer``; the command is ``perifocal``. See DEVELOPERS.md for the
map of the sub-packages and what each may import.
"""

__version__ = "0.1.0"
