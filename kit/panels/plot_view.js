// PlotView: draws a plotly figure held as plain JSON traits (data, figure_layout, figure_template,
// plot_config)
// with Plotly.react, and nothing goes back to the kernel.
//
// plotly.js itself comes once per page from the kernel's PlotlyLibrary widget (trait
// `source`), found through this model's `library` reference; a page that already has
// window.Plotly uses it.
//
// Draws are queued, one figure per animation frame: when one change redraws several charts,
// the first is painted before the next is drawn (a long chain of redraws would otherwise
// hold every chart back until the last one is done). A chart with no size (hidden, not yet
// attached) is drawn once it gets one. A chart already drawn that is out of view (scrolled
// away, in a closed tab) is redrawn when it comes into view, not before: when the same figure
// shows in two places (a workspace and a narrative cell) only the one on screen is drawn on a
// change, and the other follows when it is scrolled to. The figure div's data-last-draw
// attribute says how the last draw was made: "new", "react" or "paths" (the fast path below);
// data-in-view says whether the chart was on screen at its last check ("1"/"0"), and the
// div's headlineFigure() returns the figure the model holds (what a full draw would take).

const LOADING = "__headlinePlotlyLoading";

function plotlyFor(model) {
  if (globalThis.Plotly && globalThis.Plotly.react) {
    return Promise.resolve(globalThis.Plotly);
  }
  if (!globalThis[LOADING]) {
    globalThis[LOADING] = (async () => {
      const ref = model.get("library") || "";
      const id = ref.startsWith("IPY_MODEL_") ? ref.slice("IPY_MODEL_".length) : ref;
      let lib = null;
      for (let i = 0; i < 100 && lib === null; i++) {
        try {
          lib = await model.widget_manager.get_model(id);
        } catch (err) {
          await new Promise((r) => setTimeout(r, 50));
        }
      }
      if (lib === null) throw new Error("the plotly.js library widget was not found");
      const source = lib.get("source");
      if (!source) throw new Error("the plotly.js library widget holds no source");
      new Function(source).call(globalThis);
      if (!(globalThis.Plotly && globalThis.Plotly.react)) {
        throw new Error("plotly.js did not load");
      }
      return globalThis.Plotly;
    })();
    globalThis[LOADING].catch(() => { delete globalThis[LOADING]; });
  }
  return globalThis[LOADING];
}

// Diagnostics: when the page holds an array `window.headlinePlotLog`, every change and
// draw is logged into it as [performance.now(), what, chart id].
function logEvent(what, id) {
  const log = globalThis.headlinePlotLog;
  if (Array.isArray(log)) log.push([performance.now(), what, id]);
}

// One draw at a time, in the order the changes arrived, with frames between draws. The
// queue is the page's, not this module's: the widget framework evaluates this module once
// per chart, so module-level state would give each chart a queue of its own.
const Q = (globalThis.__headlinePlotQueue ||= { queue: [], pumping: false });
const queue = Q.queue;
const STALL_MS = 3000;

function schedule(view) {
  if (!queue.includes(view)) queue.push(view);
  if (!Q.pumping) {
    Q.pumping = true;
    queueMicrotask(pump);   // the first draw at once, before the messages behind it
  }
}

async function pump() {
  const view = queue.shift();
  let drew = false;
  if (view) {
    try {
      // a draw that never settles (its chart removed mid-way) must not stall the page's queue
      drew = await Promise.race([view.draw(), new Promise((r) => setTimeout(() => r(true), STALL_MS))]);
    } catch (err) {
      view.fail(err);
    }
  }
  if (queue.length && !drew) {
    setTimeout(pump, 0);    // nothing was drawn (out of view, no size): no frames to wait for
  } else if (queue.length) {
    // let the browser paint what was just drawn before the next figure: two frames, as
    // the fast path's paths are written in a frame callback of their own (d3 transition)
    requestAnimationFrame(() => requestAnimationFrame(() => setTimeout(pump, 0)));
  } else {
    Q.pumping = false;
  }
}

// The fast path: when only per-point arrays of scatter traces changed (x, y, the hover
// text: text, hovertext, customdata, and per-point marker sizes, colours and angles) and
// every axis has a fixed range, Plotly.animate with
// redraw: false moves the traces' paths and points and leaves the axes, legends and
// annotations as drawn (about a quarter of a full Plotly.react of the line-sizing bore chart
// in JupyterLab; the pump chart's operating points change their hover text on every edit).
// The animated frame carries every one of these arrays, so what a hover shows afterwards is
// what a full draw would show (checked by tests/browser/test_plot_fast_path.py). Anything
// else goes through Plotly.react.
const POINT_ARRAYS = ["x", "y", "text", "hovertext", "customdata"];
// per-point marker arrays (a size or colour per point) go the same way; a marker attribute
// that is one value for the trace is part of the trace's style (a change redraws in full)
const MARKER_ARRAYS = ["size", "color", "angle"];

function withoutPointArrays(trace) {
  const rest = Object.assign({}, trace);
  for (const k of POINT_ARRAYS) delete rest[k];
  if (rest.marker) {
    const m = Object.assign({}, rest.marker);
    for (const k of MARKER_ARRAYS) if (Array.isArray(m[k])) m[k] = "[per point]";
    rest.marker = m;
  }
  return JSON.stringify(rest);
}

function hasPoints(trace) {
  const x = trace.x;
  if (Array.isArray(x)) return x.length > 0;
  if (x && typeof x.bdata === "string") return x.bdata.length > 0;
  return x !== undefined && x !== null;
}

function pointArrays(trace) {
  const out = {};
  for (const k of POINT_ARRAYS) if (k in trace) out[k] = trace[k];
  if (trace.marker) {
    const m = {};
    for (const k of MARKER_ARRAYS) if (Array.isArray(trace.marker[k])) m[k] = trace.marker[k];
    if (Object.keys(m).length) out.marker = m;
  }
  return out;
}

function fixedAxes(layout) {
  const axes = Object.keys(layout).filter((k) => /^[xy]axis\d*$/.test(k));
  return axes.length >= 2 && axes.every((k) => {
    const ax = layout[k] || {};
    return ax.autorange === false && Array.isArray(ax.range);
  });
}

function signature(fig) {
  return {
    layout: JSON.stringify(fig.layout),
    config: JSON.stringify(fig.config),
    traces: fig.data.map(withoutPointArrays),
    // which arrays a trace has, and whether it has any point: a trace that gains its first
    // point or loses its last has no drawn group to move (a full draw makes it)
    keys: fig.data.map((t) => POINT_ARRAYS.filter((k) => k in t).join(",") +
      (hasPoints(t) ? "" : ";empty")),
    scatter: fig.data.every((t) => (t.type || "scatter") === "scatter"),
    fixed: fixedAxes(fig.layout),
  };
}

function onlyPointsChanged(before, after) {
  return before !== null && after.scatter && after.fixed &&
    before.layout === after.layout && before.config === after.config &&
    before.traces.length === after.traces.length &&
    before.traces.every((t, i) => t === after.traces[i] && before.keys[i] === after.keys[i]);
}

// A chart inside an element of class "hl-fit-height" (the workspace's main chart) takes the
// height its box gives it (CSS), not the figure's own height: the same figure shows at its
// own height in the narrative cells and fits the screen in the workspace.
function fitHeight(div) {
  if (!div.closest(".hl-fit-height")) return null;
  const h = div.clientHeight;
  return h > 50 ? h : null;
}

function figureOf(model, div) {
  // a deep copy: plotly writes into the nested axis objects, and an unchanged layout is not
  // sent again, so a shallow copy would let each redraw start from the one before it
  const layout = JSON.parse(JSON.stringify(model.get("figure_layout") || {}));
  const template = model.get("figure_template");
  if (template && Object.keys(template).length) layout.template = template;
  const h = div ? fitHeight(div) : null;
  if (h !== null) layout.height = h;
  return { data: model.get("data") || [], layout, config: model.get("plot_config") || {} };
}

export default {
  render({ model, el }) {
    const div = document.createElement("div");
    div.className = "hl-plot";
    div.style.width = "100%";
    const note = document.createElement("div");
    note.className = "hl-plot-message";
    el.appendChild(div);
    el.appendChild(note);
    // layout and style containment: a redraw re-lays out this chart, not the notebook around
    // it (measured in headless Chromium beside 6,000 other elements, a fast-path redraw of the
    // line-sizing bore chart took ~15 % less with it, in 3 of 4 paired runs)
    el.style.contain = "layout style";
    let drawn = false;
    let dirty = true;
    let shown = null;     // signature of what is drawn
    let alive = true;
    let Plotly = null;
    let inView = null;    // unknown until the IntersectionObserver first reports
    // for tests and diagnostics: the figure the model holds now, as a full draw would take it
    div.headlineFigure = () => figureOf(model, div);

    const view = {
      // true when a figure was drawn (the queue then lets the browser paint it)
      async draw() {
        if (!alive || !dirty) return false;
        if (!div.isConnected || div.clientWidth === 0) return false;   // drawn when sized
        if (drawn && inView === false) {
          logEvent("deferred", id);
          return false;   // out of view: redrawn when it comes into view
        }
        Plotly = Plotly || (await plotlyFor(model));
        dirty = false;
        const fig = figureOf(model, div);
        const sig = signature(fig);
        logEvent("draw", id);
        let how;
        if (drawn && onlyPointsChanged(shown, sig)) {
          how = "paths";
          await Plotly.animate(
            div,
            { data: fig.data.map(pointArrays), traces: fig.data.map((_, i) => i) },
            { transition: { duration: 0 }, frame: { duration: 0, redraw: false } });
        } else if (drawn) {
          how = "react";
          await Plotly.react(div, fig.data, fig.layout, fig.config);
        } else {
          how = "new";
          await Plotly.newPlot(div, fig.data, fig.layout, fig.config);
          drawn = true;
        }
        shown = sig;
        div.dataset.lastDraw = how;   // "new", "react" or "paths" (the fast path)
        logEvent("drawn:" + how, id);
        note.textContent = "";
        return true;
      },
      fail(err) {
        dirty = true;
        note.textContent = "chart not drawn: " + (err && err.message ? err.message : err);
      },
    };
    const id = (model.model_id || model.cid || "").toString().slice(0, 8) + ":" +
      (model.get("data") || []).length;
    const changed = () => { logEvent("changed", id); dirty = true; schedule(view); };
    model.on("change:data", changed);
    model.on("change:figure_layout", changed);
    model.on("change:figure_template", changed);
    model.on("change:plot_config", changed);

    let width = 0;
    let height = 0;
    const ro = new ResizeObserver(() => {
      const w = div.clientWidth;
      const h = fitHeight(div) || 0;
      if (w === width && h === height) return;
      const grew = h !== height;
      width = w;
      height = h;
      if (w === 0) return;
      if (grew && drawn) dirty = true;   // a fitted chart redraws at its new height
      if (!drawn || dirty) {
        schedule(view);
      } else if (Plotly) {
        Plotly.Plots.resize(div);
      }
    });
    ro.observe(div);
    // on screen or not (scroll containers and closed tabs clip); a chart that comes into
    // view with a change kept back is redrawn then
    const io = new IntersectionObserver((entries) => {
      for (const e of entries) {
        inView = e.isIntersecting;
        div.dataset.inView = inView ? "1" : "0";
        if (inView && dirty) schedule(view);
      }
    });
    io.observe(div);
    schedule(view);

    return () => {
      alive = false;
      ro.disconnect();
      io.disconnect();
      const i = queue.indexOf(view);
      if (i >= 0) queue.splice(i, 1);
      if (Plotly && drawn) Plotly.purge(div);
    };
  },
};
