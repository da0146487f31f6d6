// Small enhancements of the scenario form; the form works fully without them.
// - shows only the inputs that apply (growth form, mating, ensemble and transport switches), and
//   greys stocking/stems out for rows that are not host forest;
// - shows only the inputs of the chosen distribution kind;
// - redraws the transect strip while the layout is typed.
(function () {
  'use strict';
  var form = document.querySelector('form.scenario-form');
  if (!form) return;

  function words(s) { return (s || '').split(' ').filter(Boolean); }

  // ---- inputs used only under conditions (growth form, mating, ensemble and transport switches) ----
  function valueOf(name) {
    var el = form.elements.namedItem(name);
    if (!el) return '';
    if (el.type === 'checkbox') return el.checked ? 'on' : '';
    return 'value' in el ? String(el.value) : '';
  }
  function showConditional() {
    form.querySelectorAll('[data-show-when]').forEach(function (el) {
      var conditions;
      try { conditions = JSON.parse(el.getAttribute('data-show-when')); } catch (e) { return; }
      var on = conditions.every(function (c) { return c.values.indexOf(valueOf(c.input)) >= 0; });
      el.hidden = !on;
      el.classList.toggle('inactive', !on);
    });
  }
  showConditional();

  // ---- habitat of each segment row ----
  function showHabitat(row) {
    var select = row.querySelector('select[name$=".habitat"]');
    if (!select) return;
    row.querySelectorAll('td[data-habitats]').forEach(function (td) {
      var on = words(td.getAttribute('data-habitats')).indexOf(select.value) >= 0;
      td.classList.toggle('inactive', !on);
    });
  }
  form.querySelectorAll('table[data-rows="segments"] tbody tr[data-row]').forEach(showHabitat);

  // ---- distribution kinds ----
  function showDist(box) {
    var kind = box.querySelector('[data-dist-kind]').value;
    box.querySelectorAll('label.part').forEach(function (label) {
      label.hidden = words(label.getAttribute('data-kinds')).indexOf(kind) < 0;
    });
    // The single-value box says it is not used while a range is chosen (instead of looking unfilled).
    var field = box.closest('.field');
    var note = field && field.querySelector('[data-range-given]');
    var single = field && field.querySelector('.control input');
    if (note) note.hidden = kind === 'value';
    if (single) {
      single.classList.toggle('superseded', kind !== 'value');
      if (kind !== 'value') single.setAttribute('placeholder', note ? note.textContent : '');
      else single.removeAttribute('placeholder');
    }
  }
  form.querySelectorAll('[data-dist]').forEach(showDist);

  // ---- live strip ----
  var strip = form.querySelector('[data-strip]');
  function num(name) {
    var el = form.elements.namedItem(name);
    if (!el || !('value' in el)) return NaN;
    var s = String(el.value).trim().replace(/\u2212/g, '-').replace(/^([+-]?\d*),(\d+)$/, '$1.$2');
    return s === '' ? NaN : Number(s);
  }
  function text(name) {
    var el = form.elements.namedItem(name);
    return el && 'value' in el ? String(el.value) : '';
  }
  function rows(prefix) {
    var seen = {};
    var out = [];
    var re = new RegExp('^' + prefix.replace(/\./g, '\\.') + '\\[(\\d+)\\]\\.');
    Array.prototype.forEach.call(form.elements, function (el) {
      var m = re.exec(el.name || '');
      if (m && !seen[m[1]]) { seen[m[1]] = true; out.push(Number(m[1])); }
    });
    return out.sort(function (a, b) { return a - b; });
  }
  function pct(x) { return Math.min(100, Math.max(0, x)).toFixed(3) + '%'; }
  function kmText(x) { return (Math.abs(x) >= 100 ? x.toFixed(1) : x.toFixed(2)).replace('-', '\u2212') + ' km'; }
  function el(tag, cls, style, title) {
    var e = document.createElement(tag);
    if (cls) e.className = cls;
    if (style) e.setAttribute('style', style);
    if (title) e.title = title;
    return e;
  }
  function redraw() {
    if (!strip) return;
    var origin = num('transect.originKm');
    if (!isFinite(origin)) origin = 0;
    var segs = rows('transect.segments').map(function (i) {
      return { habitat: text('transect.segments[' + i + '].habitat'), name: text('transect.segments[' + i + '].name'), length: num('transect.segments[' + i + '].lengthKm') };
    }).filter(function (s) { return isFinite(s.length) && s.length > 0; });
    var total = segs.reduce(function (a, s) { return a + s.length; }, 0);
    var bar = strip.querySelector('[data-strip-bar]');
    var marks = strip.querySelector('[data-strip-marks]');
    var pins = strip.querySelector('[data-strip-pins]');
    var ticks = strip.querySelector('[data-strip-ticks]');
    var box = strip.querySelector('[data-strip-box]');
    bar.textContent = ''; marks.textContent = ''; pins.textContent = '';
    if (ticks) ticks.textContent = '';
    var empty = strip.querySelector('[data-strip-empty]');
    if (empty) empty.hidden = total > 0;
    if (!(total > 0)) return;
    var at = function (x) { return (100 * (x - origin)) / total; };
    var inside = function (x) { return isFinite(x) && x >= origin && x <= origin + total; };
    // Same layout as server/web/view-models/strip.ts (STRIP_LAYOUT, rem): bar, km ticks, one lane per option, site labels.
    var BAR = 1.4, TICKS = 1.2, LANE = 1.0, PINS = 1.5;
    segs.forEach(function (s) {
      bar.appendChild(el('span', 'seg hab-' + (s.habitat || 'unknown') + (s.length / total < 0.005 ? ' narrow' : ''), 'flex-grow: ' + s.length, (s.name ? s.name + ': ' : '') + (s.habitat || '').replace(/-/g, ' ') + ', ' + kmText(s.length)));
    });
    if (ticks) {
      var raw = total / 8, p = Math.pow(10, Math.floor(Math.log10(raw)));
      var step = [1, 2, 5, 10].map(function (m) { return m * p; }).filter(function (x) { return total / x <= 10; })[0] || 10 * p;
      for (var x = Math.ceil(origin / step - 1e-9) * step; x <= origin + total + 1e-9; x += step) {
        var tick = el('span', 'tick', 'left: ' + pct(at(x)));
        var tl = el('span', 'tick-label');
        tl.textContent = String(Number(x.toPrecision(6)));
        tick.appendChild(tl);
        ticks.appendChild(tick);
      }
    }
    var f = num('infestation.fromKm'), t = num('infestation.toKm');
    if (inside(f) && t > f) marks.appendChild(el('span', 'band band-infestation', 'left: ' + pct(at(f)) + '; width: ' + pct(at(Math.min(t, origin + total)) - at(f)), 'Infested'));
    var optionRows = rows('barrier.options');
    optionRows.forEach(function (i, k) {
      var from = num('barrier.options[' + i + '].fromKm'), w = num('barrier.options[' + i + '].widthM');
      if (!inside(from) || !(w > 0)) return;
      var to = Math.min(from + w / 1000, origin + total);
      var key = String.fromCharCode(65 + (k % 26));
      var band = el('span', 'band band-option', 'left: ' + pct(at(from)) + '; width: ' + pct(Math.max(at(to) - at(from), 0.4)) + '; top: ' + (BAR + TICKS + k * LANE).toFixed(2) + 'rem', key + ': ' + text('barrier.options[' + i + '].name'));
      var letter = el('span', 'band-key');
      letter.textContent = key;
      band.appendChild(letter);
      marks.appendChild(band);
    });
    var pinsTop = BAR + TICKS + optionRows.length * LANE;
    pins.style.setProperty('--pins-top', pinsTop.toFixed(2) + 'rem');
    if (box) box.style.height = (pinsTop + PINS).toFixed(2) + 'rem';
    rows('sites').forEach(function (i) {
      var x = num('sites[' + i + '].atKm');
      if (!inside(x)) return;
      var pin = el('span', 'pin' + (at(x) > 55 ? ' flip' : ''), 'left: ' + pct(at(x)));
      var label = el('span', 'pin-label');
      label.textContent = text('sites[' + i + '].name') || '(site)';
      pin.appendChild(label);
      pins.appendChild(pin);
    });
    var start = strip.querySelector('[data-strip-start]');
    var end = strip.querySelector('[data-strip-end]');
    if (start) start.textContent = kmText(origin);
    if (end) end.textContent = kmText(origin + total);
  }

  form.addEventListener('input', redraw);
  form.addEventListener('change', function (e) {
    var t = e.target;
    if (t.matches && t.matches('[data-dist-kind]')) showDist(t.closest('[data-dist]'));
    if (t.name && /\.habitat$/.test(t.name)) showHabitat(t.closest('tr'));
    showConditional();
    redraw();
  });
})();
