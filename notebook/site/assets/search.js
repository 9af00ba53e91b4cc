// Offline search over ids, titles and fields: the index is search-index.js (window.cleaveIndex).
(function () {
  "use strict";
  var box = document.getElementById("search");
  if (!box || !window.cleaveIndex) { return; }
  var input = box.querySelector("input");
  var list = box.querySelector("ul");
  var base = box.getAttribute("data-base") || "";
  function show(q) {
    while (list.firstChild) { list.removeChild(list.firstChild); }
    q = q.trim().toLowerCase();
    if (q === "") { return; }
    var words = q.split(/\s+/);
    var shown = 0;
    for (var i = 0; i < window.cleaveIndex.length && shown < 30; i++) {
      var e = window.cleaveIndex[i];
      var hay = (e.id + " " + e.title + " " + e.kind + " " + e.text).toLowerCase();
      var all = true;
      for (var w = 0; w < words.length; w++) { if (hay.indexOf(words[w]) < 0) { all = false; break; } }
      if (!all) { continue; }
      var li = document.createElement("li");
      var a = document.createElement("a");
      a.href = base + e.url;
      a.textContent = (e.id ? e.id + " — " : "") + e.title + (e.kind ? " (" + e.kind + ")" : "");
      li.appendChild(a);
      list.appendChild(li);
      shown++;
    }
  }
  input.addEventListener("input", function () { show(input.value); });
})();
