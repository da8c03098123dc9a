"""Find clipped or over-wrapped text in the running dashboard (used by the browser test and by hand).

:data:`CLIPPED_JS` runs in the page and returns one record per visible text element
of the app that is cut off (its content wider than its box, or an ellipsis shown)
or that wraps onto more than two lines: tab titles, result cards, control labels,
toggle buttons, upload buttons, the selected item of drop-down menus and the snapshot list.
"""
from __future__ import annotations

__all__ = ["CLIPPED_JS", "clipped"]

#: JavaScript: ``() => [{what, text, reason}]`` for the visible part of the app.
CLIPPED_JS = r"""
() => {
  const out = [];
  const visible = (el) => { const r = el.getBoundingClientRect();
    return r.width > 0 && r.height > 0 && getComputedStyle(el).visibility !== 'hidden' &&
           el.offsetParent !== null; };
  const canvas = document.createElement('canvas').getContext('2d');
  const textWidth = (el, text) => { const s = getComputedStyle(el);
    canvas.font = `${s.fontStyle} ${s.fontWeight} ${s.fontSize} ${s.fontFamily}`;
    return canvas.measureText(text).width; };
  const lines = (el) => { const s = getComputedStyle(el);
    let lh = parseFloat(s.lineHeight); if (!isFinite(lh)) lh = 1.2 * parseFloat(s.fontSize);
    const range = document.createRange(); range.selectNodeContents(el);
    const tops = new Set([...range.getClientRects()].filter(r => r.width > 0)
                         .map(r => Math.round(r.top / (0.6 * lh))));
    return Math.max(tops.size, Math.round(el.getBoundingClientRect().height / lh)); };
  const check = (what, sel, opts = {}) => {
    for (const el of document.querySelectorAll(sel)) {
      if (!visible(el)) continue;
      const text = (el.innerText || el.textContent || '').trim();
      if (!text) continue;
      const s = getComputedStyle(el);
      if (s.display === 'inline') continue;  // an inline box is as wide as its text: nothing to cut
      const box = el.getBoundingClientRect(), range = document.createRange();
      range.selectNodeContents(el);
      const ink = range.getBoundingClientRect();
      if (el.scrollWidth > el.clientWidth + 1)
        out.push({what, text, reason: `content ${el.scrollWidth}px in a ${el.clientWidth}px box`});
      else if (s.overflow !== 'visible' && ink.width > 0 && (ink.left < box.left - 1 || ink.right > box.right + 1))
        out.push({what, text, reason: `text ${Math.round(ink.width)}px wide in a ${Math.round(box.width)}px box`});
      else if (s.textOverflow === 'ellipsis' && s.overflow !== 'visible' &&
               textWidth(el, text) > el.clientWidth - parseFloat(s.paddingLeft) - parseFloat(s.paddingRight) + 1)
        out.push({what, text, reason: 'ellipsis shown'});
      if (opts.lines && lines(el) > opts.lines)
        out.push({what, text, reason: `${lines(el)} lines`});
    }
  };
  check('tab', '.cl-tabs .lm-TabBar-tabLabel, .cl-tabs .p-TabBar-tabLabel', {lines: 1});
  check('card', '.cl-app .cl-card');
  check('card title', '.cl-app .cl-card-title', {lines: 2});
  check('card value', '.cl-app .cl-card-body', {lines: 2});
  check('card line', '.cl-app .cl-card-sub', {lines: 2});
  check('control label', '.cl-app .widget-label, .cl-app .widget-label-basic', {lines: 2});
  check('button', '.cl-app .widget-toggle-button, .cl-app .widget-button, .cl-app .widget-upload', {lines: 2});
  check('check box', '.cl-app .widget-checkbox label', {lines: 2});
  for (const el of document.querySelectorAll('.cl-app select')) {
    if (!visible(el)) continue;
    const s = getComputedStyle(el);
    const room = el.clientWidth - parseFloat(s.paddingLeft) - parseFloat(s.paddingRight);
    const items = el.multiple || el.size > 1 ? [...el.options] : [el.options[el.selectedIndex]].filter(Boolean);
    for (const o of items) {
      const text = o.text.trim();
      if (text && textWidth(el, text) > room + 1)
        out.push({what: el.multiple || el.size > 1 ? 'list item' : 'menu', text,
                  reason: `${Math.round(textWidth(el, text))}px of text in ${Math.round(room)}px`});
    }
  }
  return out;
}
"""


def clipped(page) -> list[dict]:
    """The clipped or over-wrapped text elements on the page as it is now."""
    return page.evaluate(CLIPPED_JS)
