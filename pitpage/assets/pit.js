// pitcard pit page: the card refreshes itself in place when the event
// folder changes (a new reading, a slip, a tick) and says so in a polite
// live region; a checklist box saves where it is, the focus staying on it.
// Everything works without this file; it only saves taps.
(function () {
  "use strict";
  var body = document.body;
  var stamp = body.getAttribute("data-stamp");
  var live = document.getElementById("changed");
  var say = function (words) { if (live) { live.textContent = words; } };
  var clock = function () { return new Date().toTimeString().slice(0, 5); };

  // A box saves as it is ticked, by a post of its form that answers JSON:
  // no reload, so the focus stays where the finger or the keyboard left it.
  var bindChecks = function () {
    document.querySelectorAll("form.checkform").forEach(function (form) {
      var button = form.querySelector("button.save-ticks");
      if (button) { button.hidden = true; }
      form.querySelectorAll("input[type=checkbox]").forEach(function (box) {
        box.addEventListener("change", function () {
          fetch(form.action, { method: "POST", credentials: "same-origin", headers: { "Accept": "application/json" },
            body: new URLSearchParams(new FormData(form)) })
            .then(function (r) { return r.json().then(function (j) { return { ok: r.ok, j: j }; }); })
            .then(function (x) {
              if (x.ok) { stamp = x.j.stamp; }
              say(x.ok ? x.j.saved : x.j.error);
            })
            .catch(function () { form.submit(); });
        });
      });
    });
  };
  bindChecks();

  // The page's content afresh, in place; the focused field keeps the focus.
  var refresh = function () {
    return fetch(location.href, { credentials: "same-origin", cache: "no-store" })
      .then(function (r) { return r.ok ? r.text() : null; })
      .then(function (text) {
        if (!text) { return; }
        var doc = new DOMParser().parseFromString(text, "text/html");
        var fresh = doc.getElementById("page"), old = document.getElementById("page");
        if (!fresh || !old) { location.reload(); return; }
        var a = document.activeElement, name = a && a.name, value = a && a.value;
        old.innerHTML = fresh.innerHTML;
        stamp = doc.body.getAttribute("data-stamp") || stamp;
        bindChecks();
        if (name) {
          document.querySelectorAll("#page [name]").forEach(function (el) {
            if (el.name === name && (el.type !== "checkbox" || el.value === value)) { el.focus(); }
          });
        }
        say("Updated with new data from the folder at " + clock() + ".");
      });
  };

  if (stamp) {
    var typing = function () {
      var a = document.activeElement;
      return a && (a.tagName === "INPUT" || a.tagName === "SELECT" || a.tagName === "TEXTAREA") && a.type !== "checkbox";
    };
    setInterval(function () {
      fetch("/changes", { credentials: "same-origin", cache: "no-store" })
        .then(function (r) { return r.ok ? r.json() : null; })
        .then(function (j) {
          if (!j || j.stamp === stamp) { return; }
          if (typing()) {
            // Not under a field being typed in: say so, and let the crew choose.
            if (live && !live.querySelector("a")) {
              live.textContent = "New data in the folder: ";
              var link = document.createElement("a");
              link.href = "";
              link.textContent = "show it";
              live.appendChild(link);
            }
            return;
          }
          return refresh();
        })
        .catch(function () {});
    }, 4000);
  }
})();
