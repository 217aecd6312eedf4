// plantside: gives each control of one sidebar box the name a screen reader reads.
// ipywidgets labels a <select> or <input> through its description, but a slider's handle
// (a <div role="slider">) and a row of toggle buttons have no label of their own; this
// names them from the box's visible label and ties them to the box's help line.
// Also names the file-upload buttons without ipywidgets' "(0)" counter.
// No imports, nothing from a network.

function apply(box, model) {
  const label = model.get("label");
  const help = box.querySelector(".plantside-help");
  const helpId = help ? help.id : "";
  box.querySelectorAll(".noUi-handle").forEach((handle) => {
    if (label && handle.getAttribute("aria-label") !== label) {
      handle.setAttribute("aria-label", label);
    }
    if (helpId && handle.getAttribute("aria-describedby") !== helpId) {
      handle.setAttribute("aria-describedby", helpId);
    }
  });
  box.querySelectorAll(".widget-toggle-buttons").forEach((group) => {
    if (label && group.getAttribute("aria-label") !== label) {
      group.setAttribute("role", "group");
      group.setAttribute("aria-label", label);
    }
  });
  box.querySelectorAll("select, input[type=checkbox]").forEach((input) => {
    if (helpId && input.getAttribute("aria-describedby") !== helpId) {
      input.setAttribute("aria-describedby", helpId);
    }
  });
  box.querySelectorAll("button.widget-upload").forEach((button) => {
    const name = button.getAttribute("title") || "";
    if (name && button.getAttribute("aria-label") !== name) {
      button.setAttribute("aria-label", name);
    }
  });
}

function render({ model, el }) {
  el.style.display = "none";
  let observer = null;
  // the box is this widget's parent; it exists once the page has attached the widget
  const start = () => {
    const box = el.closest(".plantside-control");
    if (!box) {
      window.setTimeout(start, 200);
      return;
    }
    apply(box, model);
    // ipywidgets redraws a control's inside (a new range, a new description): name it again
    observer = new MutationObserver(() => apply(box, model));
    observer.observe(box, { childList: true, subtree: true });
    model.on("change:label", () => apply(box, model));
  };
  start();
  return () => {
    if (observer) {
      observer.disconnect();
    }
  };
}

export default { render };
