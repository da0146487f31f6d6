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
  var stageWrap = root.querySelector('[data-stage-wrap]');
  var timeLeft = root.querySelector('[data-time-left]');
  var where = root.querySelector('[data-where]');
  var trouble = root.querySelector('[data-trouble]');
  var resumed = root.querySelector('[data-resumed]');
  var message = root.querySelector('[data-message]');
  var cancel = root.querySelector('[data-cancel]');

  function update(d) {
    // The bar shows the work done: a cancelled run keeps the share it reached.
    if (bar) bar.value = d.fraction;
    if (pct) pct.textContent = d.percentText;
    if (status) status.textContent = d.statusText;
    if (stage) stage.textContent = d.stage;
    if (stageWrap) stageWrap.hidden = d.finished;
    if (timeLeft) timeLeft.textContent = d.timeLeftText || '';
    if (where) where.textContent = d.where;
    if (trouble) trouble.textContent = d.trouble || '';
    if (resumed) { resumed.hidden = !d.resumed; resumed.textContent = d.resumedText || ''; }
    if (message) message.textContent = d.message || '';
    if (cancel && (d.finished || d.status === 'cancelling')) cancel.hidden = true;
  }

  var source = new EventSource(root.getAttribute('data-events'));
  source.addEventListener('progress', function (e) { update(JSON.parse(e.data)); });
  source.addEventListener('end', function (e) {
    var d = JSON.parse(e.data);
    source.close();
    update(d);
    if (d.resultUrl) window.location.assign(d.resultUrl);
    // The server is stopping: the job is kept; try again once it is back.
    else if (d.serverStopping) window.setTimeout(function () { window.location.reload(); }, 5000);
    else window.location.reload();
  });
  source.onerror = function () {
    // Lost the stream (server restart, proxy, too many open streams): fall back to reloading the page.
    source.close();
    window.setTimeout(function () { window.location.reload(); }, 2000);
  };
})();
