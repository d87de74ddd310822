"""Show export: timelines -> frames -> encoders (PNG, JPEG, MP4), dome and panorama
reprojection, SVG diagrams, frame ranges, resume, progress.

May import viewer.render, viewer.geometry and viewer.scene; never pyglet or imgui.
"""
