"""Shared test support: driving the window under Xvfb (``xwindow``) and the table of
broken scene files (``broken_scenes``). Reference values with their sources live in
``tests/reference_values.py``; tests import from these, never from each other."""
