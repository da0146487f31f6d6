// Progress of a running evaluation, from the server's event stream. Without this script the page
// reloads itself every 2 seconds (a <noscript> refresh), so nothing depends on it.
(function () {
  'use strict';
  var root = document.querySelector('[data-run]');
  if (!root || root.getAttribute('data-finished') === 'true' || !window.EventSource) return;
  var bar = root.querySelector('[data-progress]');
  var pct = root.querySelector('[data-percent]');
  var status = root.querySelector('[data-status]');
  var stage = root.querySelector('[data-stage]');
  var message = root.querySelector('[data-message]');
  var cancel = root.querySelector('[data-cancel]');

  function update(d) {
    if (bar) bar.value = d.fraction;
    if (pct) pct.textContent = d.percentText;
    if (status) status.textContent = d.statusText;
    if (stage) stage.textContent = d.stage;
    if (message) message.textContent = d.message || '';
    if (cancel && d.finished) cancel.hidden = true;
  }

  var source = new EventSource(root.getAttribute('data-events'));
  source.addEventListener('progress', function (e) { update(JSON.parse(e.data)); });
  source.addEventListener('end', function (e) {
    var d = JSON.parse(e.data);
    source.close();
    update(d);
    if (d.resultUrl) window.location.assign(d.resultUrl);
    else window.location.reload();
  });
  source.onerror = function () {
    // Lost the stream (server restart, proxy): fall back to reloading the page.
    source.close();
    window.setTimeout(function () { window.location.reload(); }, 2000);
  };
})();
