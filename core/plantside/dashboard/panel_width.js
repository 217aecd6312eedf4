// plantside: reports, for each chart, the width its panel offers and the width it is drawn at.
// The kernel then redraws the chart with a plot width that fits (see panel_width.py).
// No imports, nothing from a network.

function drawnWidth(host) {
  const canvas = host.querySelector("canvas");
  if (canvas) {
    // the intended width: a style sheet may scale the canvas down until it is redrawn
    return parseFloat(canvas.style.width) || canvas.width / (window.devicePixelRatio || 1);
  }
  const svg = host.querySelector("svg.marks");
  return svg ? parseFloat(svg.getAttribute("width")) || 0 : 0;
}

function measure(root, names) {
  const report = {};
  for (const name of names) {
    const host = root.querySelector(`.plantside-chart-${name}`);
    const panel = host && host.closest(".plantside-chart");
    if (!panel) {
      continue;
    }
    const style = window.getComputedStyle(panel);
    const offered =
      panel.clientWidth - parseFloat(style.paddingLeft) - parseFloat(style.paddingRight);
    const drawn = drawnWidth(host);
    if (offered > 0 && drawn > 0) {
      report[name] = [Math.floor(offered), Math.ceil(drawn)];
    }
  }
  return report;
}

function render({ model, el }) {
  el.style.display = "none";
  let last = "";
  const tick = () => {
    if (!el.isConnected) {
      return;
    }
    const root = el.closest(".plantside-app") || document;
    const report = measure(root, model.get("names"));
    const text = JSON.stringify(report);
    if (text !== last && Object.keys(report).length) {
      last = text;
      model.set("report", report);
      model.save_changes();
    }
  };
  const timer = window.setInterval(tick, 400);
  window.addEventListener("resize", tick);
  return () => {
    window.clearInterval(timer);
    window.removeEventListener("resize", tick);
  };
}

export default { render };
