// Moves the keyboard focus (and so the view) to a problem box marked data-focus-on-load, so errors shown after
// a failed action are where the eye is. The page works without it: the box is at the top of the page.
(function () {
  var box = document.querySelector('[data-focus-on-load]');
  if (!box) return;
  box.focus();
  box.scrollIntoView({ block: 'start' });
})();
