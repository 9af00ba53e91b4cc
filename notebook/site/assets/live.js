// cleave serve: reload the page when the site was rebuilt.
(function () {
  "use strict";
  var seen = null;
  function poll() {
    fetch("/_cleave/version", { cache: "no-store" }).then(function (r) { return r.text(); }).then(function (v) {
      if (seen !== null && v !== seen) { location.reload(); return; }
      seen = v;
      setTimeout(poll, 700);
    }).catch(function () { setTimeout(poll, 2000); });
  }
  poll();
})();
