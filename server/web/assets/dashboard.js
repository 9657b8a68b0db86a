// pbfleet dashboard: small conveniences only; every page works without it.
"use strict";
document.addEventListener("DOMContentLoaded", () => {
  // Filters apply as soon as a choice is made (the Show button still works).
  for (const select of document.querySelectorAll("form.filters select")) {
    select.addEventListener("change", () => select.form.requestSubmit());
  }
});
