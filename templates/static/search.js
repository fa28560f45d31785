/* refgen offline search: filters the embedded index (static/search-index.js); no network. */
(function () {
  "use strict";
  var input = document.getElementById("search");
  var list = document.getElementById("search-results");
  if (!input || !list || !window.REFGEN_INDEX) { return; }
  function score(entry, words) {
    var hay = (entry.t + " " + entry.k).toLowerCase();
    for (var i = 0; i < words.length; i++) { if (hay.indexOf(words[i]) < 0) { return -1; } }
    var title = entry.t.toLowerCase();
    var query = words.join(" ");
    if (entry.h) {  // a page heading: below the named things, above loose keyword matches
      return title.indexOf(query) === 0 ? 2.5 : 1.5;
    }
    var name = title.slice(title.indexOf(": ") + 2);
    if (name === query) { return 4; }
    if (name.indexOf(query) === 0) { return 3; }
    return title.indexOf(words[0]) >= 0 ? 2 : 1;
  }
  function show() {
    var words = input.value.toLowerCase().split(/\s+/).filter(function (w) { return w.length > 0; });
    while (list.firstChild) { list.removeChild(list.firstChild); }
    if (!words.length) { list.hidden = true; return; }
    var hits = window.REFGEN_INDEX.map(function (e) { return [score(e, words), e]; })
      .filter(function (h) { return h[0] > 0; })
      .sort(function (a, b) { return b[0] - a[0] || (a[1].t < b[1].t ? -1 : 1); })
      .slice(0, 12);
    hits.forEach(function (h) {
      var li = document.createElement("li");
      var a = document.createElement("a");
      a.href = h[1].u;
      a.textContent = h[1].t;
      li.appendChild(a);
      list.appendChild(li);
    });
    if (!hits.length) {
      var none = document.createElement("li");
      none.textContent = "nothing found";
      list.appendChild(none);
    }
    list.hidden = false;
  }
  input.addEventListener("input", show);
  input.addEventListener("keydown", function (ev) {
    if (ev.key === "Enter") {
      var first = list.querySelector("a");
      if (first) { window.location.href = first.getAttribute("href"); }
    }
    if (ev.key === "Escape") { input.value = ""; show(); }
  });
}());
