"""The interactive viewer: the editor model, its readout, the pyglet window and its panels.

Owns the window and its loop (``window``), the imgui panels (``panels``), the moderngl
drawing of imgui's draw data (``imgui_gl``), camera input (``camera_input``) and the
plain-Python model, which imports no imgui, pyglet or GL, so it is tested on its own:
the editor (``editor``, ``readout``, ``elements_edit``, ``scene_edits``), what a window
shows and is doing (``session``: dialogs, prompts, open, exports), stills and render
jobs (``jobs``), the mission answers (``mission``: transfers, quick answers, warnings),
``clock`` and ``plots``. May import everything else in ``viewer``; nothing else imports
this package except ``viewer.cli`` (lazily).
"""
