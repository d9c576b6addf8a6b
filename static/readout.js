// readout.js: a crosshair and a data readout over ringbox plots.
//
// Progressive enhancement only: pages work without it. For every
//   <figure class="plot" data-frame='{"left":…,"top":…,"right":…,"bottom":…,
//           "xmin":…,"xmax":…,"ymin":…,"ymax":…,"logx":…,"logy":…,
//           "width":…,"height":…}'>
// wrapping an <img> or an inline <svg>, it shows the (x, y) data value under
// the mouse. The frame is the data area in output pixels (origin top-left)
// of a figure whose whole output is width × height; the image may be drawn
// at another size, so positions are scaled from the rendered box. Styles are
// set through the CSSOM, which the content security policy allows.
(function () {
  "use strict";

  function num(v) { return typeof v === "number" && isFinite(v); }

  function validFrame(f) {
    if (!f) return false;
    var keys = ["left", "top", "right", "bottom", "xmin", "xmax", "ymin", "ymax", "width", "height"];
    for (var i = 0; i < keys.length; i++) if (!num(f[keys[i]])) return false;
    if (f.right <= f.left || f.bottom <= f.top || f.width <= 0 || f.height <= 0) return false;
    if (f.logx && !(f.xmin > 0 && f.xmax > 0)) return false;
    if (f.logy && !(f.ymin > 0 && f.ymax > 0)) return false;
    return true;
  }

  // value maps a fraction t in [0, 1] of an axis to its data value.
  function value(t, lo, hi, log) {
    if (log) {
      var a = Math.log(lo), b = Math.log(hi);
      return Math.exp(a + t * (b - a));
    }
    return lo + t * (hi - lo);
  }

  function fmt(v) {
    if (v === 0) return "0";
    var a = Math.abs(v);
    if (a >= 1e5 || a < 1e-3) return v.toExponential(3).replace("e+", "e");
    return String(Number(v.toPrecision(4)));
  }

  function make(cls) {
    var d = document.createElement("div");
    d.className = cls;
    d.hidden = true;
    d.setAttribute("aria-hidden", "true");
    return d;
  }

  function attach(fig) {
    var frame;
    try { frame = JSON.parse(fig.getAttribute("data-frame")); } catch (e) { return; }
    if (!validFrame(frame)) return;
    var target = fig.querySelector("img, svg");
    if (!target) return;

    var vx = make("plot-crosshair-x"), hy = make("plot-crosshair-y"), out = make("plot-readout");
    fig.appendChild(vx);
    fig.appendChild(hy);
    fig.appendChild(out);

    function hide() { vx.hidden = hy.hidden = out.hidden = true; }

    function move(ev) {
      var box = target.getBoundingClientRect();
      var fbox = fig.getBoundingClientRect();
      // Absolute children sit in the figure's padding box, inside its border.
      var fx0 = fbox.left + fig.clientLeft, fy0 = fbox.top + fig.clientTop;
      if (box.width <= 0 || box.height <= 0) return hide();
      // The drawing keeps its aspect ratio inside the rendered box
      // (an SVG's default preserveAspectRatio, an img with height:auto).
      var s = Math.min(box.width / frame.width, box.height / frame.height);
      var ox = box.left + (box.width - frame.width * s) / 2;
      var oy = box.top + (box.height - frame.height * s) / 2;
      var px = (ev.clientX - ox) / s, py = (ev.clientY - oy) / s; // output pixels
      if (px < frame.left || px > frame.right || py < frame.top || py > frame.bottom) return hide();
      var tx = (px - frame.left) / (frame.right - frame.left);
      var ty = (frame.bottom - py) / (frame.bottom - frame.top); // y grows upwards
      var x = value(tx, frame.xmin, frame.xmax, !!frame.logx);
      var y = value(ty, frame.ymin, frame.ymax, !!frame.logy);

      var top = oy + frame.top * s - fy0, left = ox + frame.left * s - fx0;
      vx.style.left = (ev.clientX - fx0) + "px";
      vx.style.top = top + "px";
      vx.style.height = ((frame.bottom - frame.top) * s) + "px";
      hy.style.top = (ev.clientY - fy0) + "px";
      hy.style.left = left + "px";
      hy.style.width = ((frame.right - frame.left) * s) + "px";
      out.textContent = "x = " + fmt(x) + "   y = " + fmt(y);
      out.setAttribute("data-x", String(x));
      out.setAttribute("data-y", String(y));
      vx.hidden = hy.hidden = out.hidden = false;
    }

    target.addEventListener("mousemove", move);
    target.addEventListener("mouseleave", hide);
  }

  function init() {
    var figs = document.querySelectorAll("figure.plot[data-frame]");
    for (var i = 0; i < figs.length; i++) attach(figs[i]);
  }

  if (document.readyState === "loading") document.addEventListener("DOMContentLoaded", init);
  else init();
})();
