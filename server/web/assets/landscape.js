// Landscape pages, with JavaScript: (1) on the band table, "Place on the map" then clicks on the map preview
// write a band's centre line into its text field (map metres from the preview's frame;
// not offered when the scenario's points are longitude/latitude); (2) on a
// running evaluation, the page reloads when the job has moved on (without JavaScript a <noscript> refresh does it).
(function () {
  'use strict';
  var fig = document.getElementById('band-preview');
  if (fig) {
    var svg = fig.querySelector('svg');
    var f = fig.dataset;
    var left = Number(f.left), top = Number(f.top), scale = Number(f.scale), x0 = Number(f.x0), y0 = Number(f.y0);
    var active = null; // { field, points, button }
    // Clicks give map metres; a scenario in longitude/latitude keeps the typed table only.
    if (!f.lonlat) document.querySelectorAll('.js-only').forEach(function (el) { el.hidden = false; });
    var finish = function () {
      if (!active) return;
      active.button.textContent = 'Place on the map';
      fig.classList.remove('placing');
      active = null;
    };
    document.querySelectorAll('button.place-line').forEach(function (btn) {
      btn.addEventListener('click', function () {
        if (active && active.button === btn) return finish();
        finish();
        var field = document.getElementById('band-' + btn.dataset.row + '-line');
        active = { field: field, points: [], button: btn };
        field.value = '';
        btn.textContent = 'Finish';
        fig.classList.add('placing');
      });
    });
    if (svg && !f.lonlat) {
      svg.addEventListener('click', function (ev) {
        if (!active) return;
        var pt = svg.createSVGPoint();
        pt.x = ev.clientX;
        pt.y = ev.clientY;
        var p = pt.matrixTransform(svg.getScreenCTM().inverse());
        var x = x0 + (p.x - left) / scale;
        var y = y0 - (p.y - top) / scale;
        active.points.push(Math.round(x) + ' ' + Math.round(y));
        active.field.value = active.points.join('; ');
      });
    }
  }
  var prog = document.getElementById('landscape-progress');
  if (prog && prog.dataset.live) {
    var url = prog.dataset.statusUrl;
    var tick = function () {
      fetch(url, { headers: { accept: 'application/json' } })
        .then(function (r) { return r.json(); })
        .then(function (j) {
          if (['done', 'failed', 'cancelled'].indexOf(j.status) >= 0) return window.location.reload();
          var pc = Math.round(100 * j.fraction);
          document.getElementById('job-status').textContent = j.status;
          document.getElementById('job-stage').textContent = j.stage;
          document.getElementById('job-progress').value = pc;
          document.getElementById('job-percent').textContent = pc + ' %';
          setTimeout(tick, 1000);
        })
        .catch(function () { setTimeout(tick, 3000); });
    };
    setTimeout(tick, 1000);
  }
})();
