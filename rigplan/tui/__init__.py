"""rigplan's terminal app (Textual).

``rigplan.tui.app.run_app`` opens it; importing this package imports no
Textual, so the command line stays quick when it does not start the app.

Modules:

* ``session``  -- the open job: files, run log, plan edits (no Textual);
* ``present``  -- the texts and table cells shown, from the landing plan
  (no Textual);
* ``app``      -- the App, its actions and :func:`build_app` / :func:`run_app`;
* ``panes``    -- overview, string and tally grid, running, rig;
* ``charts``   -- the Charts tab (textual-plot, imported when first shown);
* ``dialogs``  -- prompt, yes/no, quit and key-list screens;
* ``commands`` -- every action: keys, help and command palette.
"""
