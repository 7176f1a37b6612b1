// Checks a picture strewn drew, after the browser has laid it out (tests/report/check_pictures.sh).
// For every <svg> on the page: a title, axes with coordinates, a north arrow or its note, a colour
// bar and a legend exist (options.plan, default true); no two texts overlap (their boxes as the browser measured them, not as
// strewn estimated them); every text lies inside the picture; probabilities share one format
// (no "1e-05", no "0.001"); with options.unsafe, unsafe-area polygons exist with a size.
// The verdict goes to the body's data-pictures attribute: "ok" or the list of faults.
function checkPictures(options) {
  var faults = [];
  var svgs = document.querySelectorAll(options.selector || 'svg');
  if (svgs.length === 0) faults.push('no svg on the page');
  Array.prototype.forEach.call(svgs, function (svg, n) {
    var where = 'svg ' + n + ': ';
    function need(selector, what, atLeast) {
      var found = svg.querySelectorAll(selector).length;
      if (found < (atLeast || 1)) faults.push(where + 'missing ' + what + ' (' + selector + ': ' + found + ')');
    }
    var title = svg.querySelector('title');
    if (!title || title.textContent.trim().length < 5) faults.push(where + 'no <title>');
    if (options.plan !== false) {  // a site plan (the Q-Q plot of `fit` is not one)
      need('text.title', 'a visible title');
      need('#axes text.tick', 'axis tick labels', 4);
      need('#axes text.axis-title', 'both axis titles', 2);
      need('#north text', 'a north arrow or "y axis = grid north"');
      need('#colour-bar rect', 'a colour bar', 2);
      need('#legend text', 'a legend', 2);
    } else {
      need('#legend text', 'a legend', 2);
    }
    if (options.unsafe) {
      need('#unsafe-areas path.unsafe-area', 'unsafe-area polygons');
      Array.prototype.forEach.call(svg.querySelectorAll('#unsafe-areas path.unsafe-area'), function (p) {
        var b = p.getBoundingClientRect();
        if (!(b.width > 2 && b.height > 2)) faults.push(where + 'an unsafe area with no size');
      });
    }
    var outer = svg.getBoundingClientRect();
    var boxes = [];
    Array.prototype.forEach.call(svg.querySelectorAll('text'), function (t) {
      var text = t.textContent.trim();
      if (text === '') return;
      var r = t.getBoundingClientRect();
      if (r.width === 0 || r.height === 0) return;
      if (r.left < outer.left - 0.5 || r.right > outer.right + 0.5 || r.top < outer.top - 0.5 || r.bottom > outer.bottom + 0.5)
        faults.push(where + 'text outside the picture: "' + text + '"');
      if (options.numbers && (/e-0\d/.test(text) || /(^|[^\d.])0\.00\d/.test(text)))
        faults.push(where + 'a probability in another format: "' + text + '"');
      boxes.push({text: text, r: r});
    });
    for (var i = 0; i < boxes.length; ++i)
      for (var j = i + 1; j < boxes.length; ++j) {
        var a = boxes[i].r, b = boxes[j].r;
        var w = Math.min(a.right, b.right) - Math.max(a.left, b.left);
        var h = Math.min(a.bottom, b.bottom) - Math.max(a.top, b.top);
        if (w > 0.5 && h > 0.5) faults.push(where + 'texts overlap: "' + boxes[i].text + '" and "' + boxes[j].text + '"');
      }
    if (boxes.length < 10) faults.push(where + 'only ' + boxes.length + ' texts');
  });
  document.body.setAttribute('data-pictures', faults.length === 0 ? 'ok' : faults.join(' | '));
}
