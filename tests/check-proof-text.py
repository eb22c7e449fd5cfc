#!/usr/bin/env python3
"""Reads proof sheets as a reviewer would and fails on overprinted text.

For every page of every PDF given:
- every word's box as poppler's pdftotext -bbox-layout reports it;
- every straight line stroked on the page itself (dimension, extension and
  leader lines, rules, frames, outlines), read from the page's content
  stream (PDF 32000-1:2008, 8.4 and 8.5: q Q cm w m l re h S s);
- the size of every text shown (Tf, Tm), and the cap height of its font
  from the installed font file's OS/2 table (sCapHeight / unitsPerEm, the
  OpenType specification), the font found by fc-match from the family and
  style the PDF names.

Fails when two words overlap, when a word is crossed by a stroked line, or
when a text's capital height is below 2.5 mm (the least lettering height of
ISO 3098-0 for drawings, from memory) on a sheet whose title is not exempt.

usage: check-proof-text.py [--exempt-title TEXT]... PDF...
"""
import re
import struct
import subprocess
import sys
import zlib
import xml.etree.ElementTree as ET

MM = 72 / 25.4           # points per millimetre
MIN_CAP_MM = 2.5
# Word boxes are poppler's (ascent to descent of the font); they touch
# when text is set solid, so a little is allowed.
OVERLAP_MM = 0.15
CROSS_MM = 0.05          # a line inside a word's box by more than this


def objects(data):
    found = {}
    for m in re.finditer(rb'(\d+) 0 obj\s*(.*?)endobj', data, re.S):
        found[int(m.group(1))] = m.group(2)
    return found


def stream(body):
    m = re.search(rb'stream\r?\n(.*?)endstream', body, re.S)
    raw = m.group(1)
    if b'/FlateDecode' in body:
        return zlib.decompressobj().decompress(raw)
    return raw


def pages_in_order(objs):
    """Page objects in document order, following /Kids from the root."""
    root = None
    for body in objs.values():
        if re.search(rb'/Type\s*/Catalog', body):
            root = int(re.search(rb'/Pages (\d+) 0 R', body).group(1))
    order = []

    def walk(n):
        body = objs[n]
        kids = re.search(rb'/Kids\s*\[(.*?)\]', body, re.S)
        if kids and re.search(rb'/Type\s*/Pages', body):
            for k in re.findall(rb'(\d+) 0 R', kids.group(1)):
                walk(int(k))
        else:
            order.append(n)
    walk(root)
    return order


TOKEN = re.compile(rb'\((?:\\.|[^\\)])*\)|<[0-9A-Fa-f\s]*>|\[|\]|/[^\s/\[\]()<>]+'
                   rb'|[-+]?(?:\d+\.?\d*|\.\d+)|[A-Za-z\'"*]+|<<|>>')


def mul(a, b):
    """a then b: PDF matrices [a b c d e f], row vectors."""
    return [a[0] * b[0] + a[1] * b[2], a[0] * b[1] + a[1] * b[3],
            a[2] * b[0] + a[3] * b[2], a[2] * b[1] + a[3] * b[3],
            a[4] * b[0] + a[5] * b[2] + b[4],
            a[4] * b[1] + a[5] * b[3] + b[5]]


def apply(m, x, y):
    return (m[0] * x + m[2] * y + m[4], m[1] * x + m[3] * y + m[5])


def clip_segment(seg, box):
    """The part of seg inside box (Liang-Barsky), or None."""
    (x0, y0), (x1, y1) = seg
    dx, dy = x1 - x0, y1 - y0
    t0, t1 = 0.0, 1.0
    for p, q in ((-dx, x0 - box[0]), (dx, box[2] - x0), (-dy, y0 - box[1]),
                 (dy, box[3] - y0)):
        if p == 0:
            if q < 0:
                return None
        else:
            t = q / p
            if p < 0:
                t0 = max(t0, t)
            else:
                t1 = min(t1, t)
    if t0 >= t1:
        return None
    return ((x0 + t0 * dx, y0 + t0 * dy), (x0 + t1 * dx, y0 + t1 * dy))


def clipped(path, clip):
    if clip is None:
        return list(path)
    found = []
    for seg in path:
        c = clip_segment(seg, clip)
        if c:
            found.append(c)
    return found


def read_page(content, page_height):
    """Stroked straight segments (device points, y down) and the text
    shown: (font resource, size in points)."""
    ctm = [1, 0, 0, 1, 0, 0]
    clip = None           # the clip path's bounding box (a rectangle)
    stack = []
    path = []             # list of segments in user space
    start = current = None
    segments = []
    texts = []
    font, tm_scale, tf = None, 1.0, 1.0
    operands = []
    for tok in TOKEN.findall(content):
        if tok[:1].isalpha() or tok in (b"'", b'"'):
            op = tok
            try:
                nums = [float(t) for t in operands]
            except ValueError:
                nums = []
            if op == b'q':
                stack.append((ctm, clip))
            elif op == b'Q':
                ctm, clip = stack.pop()
            elif op == b'cm' and len(nums) == 6:
                ctm = mul(nums, ctm)
            elif op == b'm' and len(nums) == 2:
                start = current = apply(ctm, *nums)
            elif op == b'l' and len(nums) == 2:
                p = apply(ctm, *nums)
                path.append((current, p))
                current = p
            elif op == b'h' and start is not None:
                path.append((current, start))
                current = start
            elif op == b're' and len(nums) == 4:
                x, y, w, h = nums
                c = [apply(ctm, x, y), apply(ctm, x + w, y),
                     apply(ctm, x + w, y + h), apply(ctm, x, y + h)]
                for i in range(4):
                    path.append((c[i], c[(i + 1) % 4]))
            elif op in (b'c', b'v', b'y') and len(nums) >= 2:
                current = apply(ctm, *nums[-2:])
            elif op in (b'S', b's'):
                segments.extend(clipped(path, clip))
                path = []
            elif op in (b'W', b'W*'):
                if path:
                    xs = [c[0] for seg in path for c in seg]
                    ys = [c[1] for seg in path for c in seg]
                    box = (min(xs), min(ys), max(xs), max(ys))
                    clip = box if clip is None else (
                        max(clip[0], box[0]), max(clip[1], box[1]),
                        min(clip[2], box[2]), min(clip[3], box[3]))
            elif op in (b'f', b'F', b'f*', b'B', b'B*', b'b', b'b*', b'n'):
                if op in (b'B', b'B*', b'b', b'b*'):
                    segments.extend(clipped(path, clip))
                path = []
            elif op == b'Tf' and len(operands) == 2:
                font = operands[0].decode()
                tf = float(operands[1])
            elif op == b'Tm' and len(nums) == 6:
                m = mul(nums, ctm)
                tm_scale = (abs(m[0] * m[3] - m[1] * m[2])) ** 0.5
            elif op in (b'Tj', b'TJ', b"'", b'"'):
                texts.append((font, tf * tm_scale))
            operands = []
        else:
            operands.append(tok)
    # to top-down device space, as pdftotext reports
    flipped = [((a[0], page_height - a[1]), (b[0], page_height - b[1]))
               for a, b in segments]
    return flipped, texts


def font_resources(objs, page):
    """Font resource name -> (family, bold) for a page."""
    body = objs[page]
    res = re.search(rb'/Resources (\d+) 0 R', body)
    res = objs[int(res.group(1))] if res else body
    fonts = re.search(rb'/Font\s*<<(.*?)>>', res, re.S)
    found = {}
    if not fonts:
        return found
    for name, num in re.findall(rb'/([^\s/]+) (\d+) 0 R', fonts.group(1)):
        font = objs[int(num)]
        desc = re.search(rb'/DescendantFonts\s*\[\s*(\d+) 0 R', font)
        if desc:
            font = objs[int(desc.group(1))]
        fd = re.search(rb'/FontDescriptor (\d+) 0 R', font)
        fd = objs[int(fd.group(1))] if fd else font
        base = re.search(rb'/FontName /(\S+)', fd).group(1).decode()
        base = base.split('+')[-1]
        found['/' + name.decode()] = base
    return found


CAP = {}


def cap_ratio(base):
    """sCapHeight / unitsPerEm of the installed font named like the PDF's
    BaseFont ("LiberationSans-Bold")."""
    if base in CAP:
        return CAP[base]
    family, _, style = base.partition('-')
    family = re.sub(r'(?<=[a-z])(?=[A-Z])', ' ', family)
    pattern = family + (':style=' + style if style else ':style=Regular')
    path = subprocess.run(['fc-match', '-f', '%{file}', pattern],
                          capture_output=True, text=True,
                          check=True).stdout
    data = open(path, 'rb').read()
    count = struct.unpack('>H', data[4:6])[0]
    tables = {}
    for i in range(count):
        tag = data[12 + 16 * i:16 + 16 * i].decode('latin1')
        offset, length = struct.unpack('>II', data[20 + 16 * i:28 + 16 * i])
        tables[tag] = offset
    units = struct.unpack('>H', data[tables['head'] + 18:
                                     tables['head'] + 20])[0]
    os2 = tables['OS/2']
    version = struct.unpack('>H', data[os2:os2 + 2])[0]
    if version < 2:
        raise SystemExit(f'{path}: OS/2 version {version} has no cap height')
    cap = struct.unpack('>h', data[os2 + 88:os2 + 90])[0]
    CAP[base] = cap / units
    return CAP[base]


def words(pdf):
    """Per page: list of (text, x0, y0, x1, y1) in points."""
    xml = subprocess.run(['pdftotext', '-bbox-layout', pdf, '-'],
                         capture_output=True, check=True).stdout
    xml = re.sub(rb'<!DOCTYPE[^>]*>', b'', xml)
    xml = re.sub(rb'xmlns="[^"]*"', b'', xml, count=1)
    root = ET.fromstring(xml)
    pages = []
    for page in root.iter('page'):
        found = []
        for w in page.iter('word'):
            found.append((w.text or '', float(w.get('xMin')),
                          float(w.get('yMin')), float(w.get('xMax')),
                          float(w.get('yMax'))))
        pages.append((float(page.get('height')), found))
    return pages


def crosses(seg, box, inset):
    """Whether segment seg enters box shrunk by inset."""
    inner = (box[0] + inset, box[1] + inset, box[2] - inset, box[3] - inset)
    if inner[0] >= inner[2] or inner[1] >= inner[3]:
        return False
    return clip_segment(seg, inner) is not None


def check(pdf, exempt):
    data = open(pdf, 'rb').read()
    objs = objects(data)
    order = pages_in_order(objs)
    text_pages = words(pdf)
    problems = []
    for number, (page, (height, found)) in enumerate(zip(order, text_pages),
                                                     start=1):
        body = objs[page]
        contents = re.findall(rb'(\d+) 0 R',
                              re.search(rb'/Contents\s*(\[.*?\]|\d+ 0 R)',
                                        body, re.S).group(1))
        content = b''.join(stream(objs[int(c)]) for c in contents)
        segments, texts = read_page(content, height)
        words_text = ' '.join(w[0] for w in found)
        where = f'{pdf} sheet {number}'
        skip = any(e in words_text for e in exempt)
        resources = font_resources(objs, page)
        if not skip:
            for font, size in texts:
                base = resources.get(font)
                if base is None:
                    continue
                cap = size * cap_ratio(base) / MM
                if cap < MIN_CAP_MM - 0.01:
                    problems.append(f'{where}: lettering {cap:.2f} mm '
                                    f'high ({base}), under {MIN_CAP_MM} mm')
                    break
        inset = OVERLAP_MM * MM / 2
        boxes = [w for w in found if w[0].strip()]
        for i, a in enumerate(boxes):
            for b in boxes[i + 1:]:
                if (min(a[3], b[3]) - max(a[1], b[1]) > 2 * inset and
                        min(a[4], b[4]) - max(a[2], b[2]) > 2 * inset):
                    problems.append(f'{where}: "{a[0]}" overlaps "{b[0]}"')
            for seg in segments:
                if crosses(seg, a[1:], CROSS_MM * MM):
                    (x0, y0), (x1, y1) = seg
                    problems.append(
                        f'{where}: a line ({x0 / MM:.1f}, {y0 / MM:.1f}) to '
                        f'({x1 / MM:.1f}, {y1 / MM:.1f}) mm crosses '
                        f'"{a[0]}"')
                    break
    return problems


def main(argv):
    exempt = []
    pdfs = []
    args = iter(argv)
    for a in args:
        if a == '--exempt-title':
            exempt.append(next(args))
        else:
            pdfs.append(a)
    problems = []
    for pdf in pdfs:
        problems.extend(check(pdf, exempt))
    for p in problems:
        print(p)
    print(f'{len(pdfs)} proofs, {len(problems)} problems')
    return 1 if problems else 0


if __name__ == '__main__':
    sys.exit(main(sys.argv[1:]))
