// The second independent Gerber reader of the tests: tracespace's
// gerber-parser and gerber-plotter (npm, version 4) read a file, and
// gerber-to-svg renders it to SVG; the plotter's objects are then
// sampled at pixel centres over a window, as gerbv's non-antialiased
// render is, and measured.
//
// usage: node measure.js FILE X0 Y0 X1 Y1 DPI MARGIN_PX
// prints one line: "area A extent X0 Y0 X1 Y1 objects N svg BYTES"
// (mm, mm^2), or "error TEXT" and exits 1.  Warnings of the parser other
// than its note about X2 attribute commands (%TF, %TA, %TO, %TD), which
// version 4 does not read, count as errors.
'use strict';
const fs = require('fs');
const gerberParser = require('gerber-parser');
const gerberPlotter = require('gerber-plotter');
const gerberToSvg = require('gerber-to-svg');

const [file, sx0, sy0, sx1, sy1, sdpi, smargin] = process.argv.slice(2);
const px = 25.4 / Number(sdpi);
const margin = Number(smargin);
const left = (Math.floor(Number(sx0) / px) - margin) * px;
const bottom = (Math.floor(Number(sy0) / px) - margin) * px;
const cols = Math.ceil(Number(sx1) / px) + margin - Math.round(left / px);
const rows = Math.ceil(Number(sy1) / px) + margin - Math.round(bottom / px);
const grid = new Uint8Array(cols * rows);
const text = fs.readFileSync(file, 'utf8');

function die(message) {
  console.log('error ' + message);
  process.exit(1);
}

const attributeNote = /^block "%T[FAOD][^"]*" was not recognized and was ignored$/;
function warned(w) {
  if (!attributeNote.test(w.message))
    die('line ' + w.line + ': ' + w.message);
}

// pixel (c, r) has its centre at (left + (c + 0.5) px, bottom + (r + 0.5) px)
function colOf(x) { return (x - left) / px - 0.5; }
function rowOf(y) { return (y - bottom) / px - 0.5; }
function set(c, r) {
  if (c < 0 || r < 0 || c >= cols || r >= rows) die('drawn outside the window at ' + c + ',' + r + ' of ' + cols + 'x' + rows);
  grid[r * cols + c] = 1;
}

// one closed contour, even-odd, sampled row by row
function fillContour(points) {
  let y0 = Infinity, y1 = -Infinity;
  for (const p of points) { y0 = Math.min(y0, p[1]); y1 = Math.max(y1, p[1]); }
  for (let r = Math.ceil(rowOf(y0)); r <= Math.floor(rowOf(y1)); r++) {
    const y = bottom + (r + 0.5) * px;
    const xs = [];
    for (let i = 0; i < points.length; i++) {
      const a = points[i], b = points[(i + 1) % points.length];
      if ((a[1] > y) !== (b[1] > y))
        xs.push(a[0] + (y - a[1]) * (b[0] - a[0]) / (b[1] - a[1]));
    }
    xs.sort((p, q) => p - q);
    for (let k = 0; k + 1 < xs.length; k += 2)
      for (let c = Math.ceil(colOf(xs[k])); c <= Math.floor(colOf(xs[k + 1])); c++)
        if (left + (c + 0.5) * px < xs[k + 1]) set(c, r);
  }
}

// pixels within radius of the segment a-b (a round-ended stroke)
function capsule(a, b, radius) {
  const c0 = Math.ceil(colOf(Math.min(a[0], b[0]) - radius));
  const c1 = Math.floor(colOf(Math.max(a[0], b[0]) + radius));
  const r0 = Math.ceil(rowOf(Math.min(a[1], b[1]) - radius));
  const r1 = Math.floor(rowOf(Math.max(a[1], b[1]) + radius));
  const dx = b[0] - a[0], dy = b[1] - a[1], len2 = dx * dx + dy * dy;
  for (let r = r0; r <= r1; r++)
    for (let c = c0; c <= c1; c++) {
      const x = left + (c + 0.5) * px, y = bottom + (r + 0.5) * px;
      let t = len2 > 0 ? ((x - a[0]) * dx + (y - a[1]) * dy) / len2 : 0;
      t = Math.max(0, Math.min(1, t));
      const ex = x - (a[0] + t * dx), ey = y - (a[1] + t * dy);
      if (ex * ex + ey * ey <= radius * radius) set(c, r);
    }
}

function rectangle(x0, y0, x1, y1) {
  for (let r = Math.ceil(rowOf(y0)); r <= Math.floor(rowOf(y1)); r++)
    for (let c = Math.ceil(colOf(x0)); c <= Math.floor(colOf(x1)); c++)
      set(c, r);
}

// a region's path split into its contours (a segment not starting where
// the last one ended begins a new contour)
function contours(path) {
  const out = [];
  let current = null, last = null;
  for (const s of path) {
    if (s.type !== 'line') die('a region segment of type ' + s.type);
    if (!last || s.start[0] !== last[0] || s.start[1] !== last[1]) {
      current = [s.start];
      out.push(current);
    }
    current.push(s.end);
    last = s.end;
  }
  return out.map(c => c.slice(0, -1));
}

const tools = {};
let objects = 0;
function plot(o) {
  if (o.type === 'shape') {
    tools[o.tool] = o.shape;
  } else if (o.type === 'pad') {
    objects++;
    for (const s of tools[o.tool]) {
      if (s.type === 'circle') capsule([o.x + s.cx, o.y + s.cy], [o.x + s.cx, o.y + s.cy], s.r);
      else if (s.type === 'rect' && !s.r)
        rectangle(o.x + s.cx - s.width / 2, o.y + s.cy - s.height / 2,
                  o.x + s.cx + s.width / 2, o.y + s.cy + s.height / 2);
      else die('a flash of shape ' + s.type);
    }
  } else if (o.type === 'fill') {
    objects++;
    for (const c of contours(o.path)) fillContour(c);
  } else if (o.type === 'stroke') {
    objects++;
    for (const s of o.path) {
      if (s.type !== 'line') die('a stroke segment of type ' + s.type);
      capsule(s.start, s.end, o.width / 2);
    }
  } else if (o.type === 'polarity') {
    if (o.polarity !== 'dark') die('clear polarity');
  } else if (o.type === 'repeat') {
    die('step and repeat');
  }
}

function measure(svgBytes) {
  let dark = 0, c0 = Infinity, c1 = -Infinity, r0 = Infinity, r1 = -Infinity;
  for (let r = 0; r < rows; r++)
    for (let c = 0; c < cols; c++)
      if (grid[r * cols + c]) {
        dark++;
        c0 = Math.min(c0, c); c1 = Math.max(c1, c);
        r0 = Math.min(r0, r); r1 = Math.max(r1, r);
      }
  const f = v => v.toFixed(6);
  console.log('area ' + f(dark * px * px) + ' extent ' +
              (dark ? [left + c0 * px, bottom + r0 * px, left + (c1 + 1) * px,
                       bottom + (r1 + 1) * px].map(f).join(' ')
                    : '0 0 0 0') +
              ' objects ' + objects + ' svg ' + svgBytes);
}

const parser = gerberParser();
const plotter = gerberPlotter();
parser.on('warning', warned);
plotter.on('warning', warned);
parser.once('error', e => die(e.message));
plotter.once('error', e => die(e.message));
plotter.on('data', plot);
plotter.on('end', () => {
  // the same file through gerber-to-svg, which must convert it too
  const converter = gerberToSvg(text, { id: 'layer' }, (error, svg) => {
    if (error) die('gerber-to-svg: ' + error.message);
    if (!svg || svg.indexOf('<svg') < 0) die('gerber-to-svg wrote no SVG');
    measure(svg.length);
  });
  converter.on('warning', warned);
});
parser.pipe(plotter);
parser.end(text);
