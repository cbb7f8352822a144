// Layout check of the decision record, run by the browser test (crates/oblique-cli/tests/cli/
// report.rs) in a copy of the page: every table and every figure must fit its container and the
// window, and no word of the text may be broken across lines except after a hyphen or a slash.
// The result goes into <pre id="layout-check"> as JSON, read back from the DOM that --dump-dom
// prints.
(function () {
  var out = { width: document.documentElement.clientWidth, tables: 0, words: 0, overflow: [], broken: [] };
  var W = document.documentElement.clientWidth;
  document.querySelectorAll('table').forEach(function (t) {
    out.tables += 1;
    var r = t.getBoundingClientRect();
    var p = t.parentElement.getBoundingClientRect();
    if (t.scrollWidth > t.clientWidth + 1 || r.right > p.right + 1 || r.right > W + 1) {
      var head = (t.querySelector('th') || t).textContent.slice(0, 50);
      out.overflow.push(head + ': ' + Math.round(r.width) + ' px in ' + Math.round(p.width) + ' px');
    }
  });
  out.figures = 0;
  document.querySelectorAll('figure svg, img, object').forEach(function (f) {
    out.figures += 1;
    var r = f.getBoundingClientRect();
    var p = f.parentElement.getBoundingClientRect();
    if (r.right > p.right + 1 || r.right > W + 1 || r.left < p.left - 1) {
      out.overflow.push('figure ' + out.figures + ': ' + Math.round(r.width) + ' px in ' + Math.round(p.width) + ' px');
    }
  });
  var walker = document.createTreeWalker(document.body, NodeFilter.SHOW_TEXT);
  var n;
  while ((n = walker.nextNode())) {
    if (n.parentElement.closest('svg, script, style')) continue;
    var text = n.textContent;
    var re = /\S+/g;
    var m;
    while ((m = re.exec(text))) {
      out.words += 1;
      var range = document.createRange();
      range.setStart(n, m.index);
      range.setEnd(n, m.index + m[0].length);
      var rects = Array.prototype.filter.call(range.getClientRects(), function (q) { return q.width > 0; });
      if (rects.length < 2) continue;
      var top0 = null;
      var ok = false;
      for (var k = 0; k < m[0].length; k++) {
        var one = document.createRange();
        one.setStart(n, m.index + k);
        one.setEnd(n, m.index + k + 1);
        var cr = one.getClientRects()[0];
        if (!cr) continue;
        if (top0 === null) { top0 = cr.top; } else if (Math.abs(cr.top - top0) > 2) {
          ok = k > 0 && '-/'.indexOf(m[0][k - 1]) >= 0;
          break;
        }
      }
      if (!ok) out.broken.push(m[0]);
    }
  }
  var pre = document.createElement('pre');
  pre.id = 'layout-check';
  pre.textContent = JSON.stringify(out);
  document.body.appendChild(pre);
})();
