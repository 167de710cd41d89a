// pitcard pit page: the card refreshes itself when the event folder changes
// (a new reading, a slip, a tick); a checklist box saves as it is ticked.
// Everything works without this file; it only saves taps.
(function () {
  "use strict";
  var body = document.body;
  var stamp = body.getAttribute("data-stamp");
  if (stamp) {
    var typing = function () {
      var a = document.activeElement;
      return a && (a.tagName === "INPUT" || a.tagName === "SELECT") && a.type !== "checkbox";
    };
    setInterval(function () {
      fetch("/changes", { credentials: "same-origin", cache: "no-store" })
        .then(function (r) { return r.ok ? r.json() : null; })
        .then(function (j) {
          if (!j || j.stamp === stamp) { return; }
          if (typing()) { document.getElementById("changed").hidden = false; return; }
          location.reload();
        })
        .catch(function () {});
    }, 4000);
  }
  document.querySelectorAll("form.checkform input[type=checkbox]").forEach(function (box) {
    box.addEventListener("change", function () { box.form.submit(); });
  });
})();
