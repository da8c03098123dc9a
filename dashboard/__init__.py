"""The convlib dashboard: a voila app on top of convlib.

``dashboard/app.ipynb`` builds :class:`dashboard.app.App` on convlib's demo study.
Panels (``dashboard.panels``) are ipywidgets containers with typed traitlets;
figures (``dashboard.figures``) are pure functions of convlib results; every
convlib call is in ``dashboard.compute``; settings in ``dashboard.settings``;
``dashboard.report`` renders a snapshot as self-contained HTML;
``python -m dashboard.serve`` starts voila locally or for a team.
"""
