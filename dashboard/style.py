"""The dashboard's style sheet (shown once in an HTML widget at the top of the app)."""

CSS = """
<style>
.cl-app { font-family: system-ui, -apple-system, "Segoe UI", Roboto, sans-serif; color: #1d252c;
          font-variant-numeric: tabular-nums; }
/* tabs size to their titles (never cut off); on a narrow window they wrap onto a second row */
.cl-app .cl-tabs > .lm-TabBar .lm-TabBar-content { flex-wrap: wrap; }
.cl-app .cl-tabs > .lm-TabBar { min-height: var(--jp-widgets-horizontal-tab-height); height: auto; }
.cl-app .cl-tabs > .lm-TabBar .lm-TabBar-tab { flex: 0 0 auto; min-width: 0; padding: 0 9px; }
.cl-app .cl-tabs > .lm-TabBar .lm-TabBar-tabLabel { overflow: visible; text-overflow: clip; }
/* a control's label with its unit may take two lines rather than be cut off */
.cl-app .widget-inline-hbox > .widget-label { white-space: normal; overflow: visible; text-overflow: clip;
          line-height: 14px; display: flex; flex-direction: column; justify-content: center; text-align: right; }
.cl-header { align-items: center; border-bottom: 2px solid #1b5e9a; padding: 4px 8px; margin-bottom: 6px; }
.cl-title { font-size: 17px; font-weight: 600; }
.cl-title small { font-weight: 400; color: #5f6b76; font-size: 12px; display: block; }
.cl-status { color: #5f6b76; font-size: 12px; min-width: 110px; text-align: right; }
.cl-sidebar { border-right: 1px solid #d6dde3; padding-right: 6px; }
.cl-section { font-weight: 600; font-size: 13px; color: #1b5e9a; margin: 8px 0 2px 0;
              border-bottom: 1px solid #e3e8ec; }
.cl-card { border: 1px solid #d6dde3; border-radius: 6px; padding: 3px 8px; margin: 0 5px 5px 0;
           flex: 1 1 110px; min-width: 110px; background: #f7f9fb; }
.cl-card-title { font-size: 12px; color: #5f6b76; }
.cl-card-body { line-height: 1.2; }
.cl-value { white-space: nowrap; }
.cl-card-regime { flex: 1.5 1 150px; }
.cl-card-regime .cl-value { font-size: 15px; white-space: normal; }
.cl-value { font-size: 18px; font-weight: 600; }
.cl-unit { font-size: 12px; color: #3c4852; }
.cl-card-sub { font-size: 11px; color: #5f6b76; line-height: 1.25; }
.cl-msg { border-radius: 4px; padding: 4px 8px; margin: 2px 0 4px 0; font-size: 12px; line-height: 1.35; }
.cl-msg-info { background: #eef4fa; border-left: 4px solid #1b5e9a; }
.cl-msg-warn { background: #fff7e0; border-left: 4px solid #b8860b; }
.cl-msg-caution { background: #fdecea; border-left: 4px solid #c0392b; }
.cl-msg-error { background: #fdecea; border-left: 4px solid #8b0000; font-weight: 600; }
.cl-table table { border-collapse: collapse; font-size: 12px; margin: 4px 0; }
.cl-table th, .cl-table td { border-bottom: 1px solid #e3e8ec; padding: 2px 10px 2px 0; text-align: left; }
.cl-app pre.cl-pre { font-size: 11px; background: #f7f9fb; padding: 6px; max-height: 320px; overflow: auto;
          font-family: ui-monospace, "DejaVu Sans Mono", "Liberation Mono", Menlo, Consolas, monospace !important;
          white-space: pre; line-height: 1.35; font-variant-numeric: tabular-nums; }
.cl-table td { font-variant-numeric: tabular-nums; }
.cl-hint { font-size: 11px; color: #5f6b76; line-height: 1.4; }
.cl-busy { opacity: 0.85; }
.cl-download { font-weight: 600; }
.cl-panel { padding-top: 4px; }
/* the survey's ranked table: one line per row, scrolled inside its box when wide or long */
.cl-survey-table table { white-space: nowrap; margin: 0; }
.cl-survey-table th, .cl-survey-table td { line-height: 1.35; padding: 2px 10px 2px 0; vertical-align: top; }
.cl-survey-table th { position: sticky; top: 0; background: #ffffff; }
</style>
"""
