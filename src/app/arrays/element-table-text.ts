import type { ArrayElement } from '../../../shared/arrays/array-geometry';

/**
 * The editable element table as text: one element per line, "x, y, z, channel, gain, excluded"
 * (the last three optional). Accepts pasted CSV with commas, semicolons, tabs or spaces.
 */
export function elementsToText(elements: ArrayElement[]): string {
  return elements.map((e) => `${e.position.join(', ')}, ${e.channel}, ${e.gain}, ${e.excluded ? 'excluded' : 'used'}`).join('\n');
}

export function textToElements(text: string): { elements: ArrayElement[]; error: string | null } {
  const elements: ArrayElement[] = [];
  const lines = text.split(/\r?\n/).map((l) => l.trim()).filter((l) => l && !l.startsWith('#'));
  for (const [i, line] of lines.entries()) {
    const cells = line.split(/[,;\t ]+/).filter(Boolean);
    if (i === 0 && cells.some((c) => /^[a-z]/i.test(c) && !/^(used|excluded)$/i.test(c))) continue; // header row
    const [x, y, z] = cells.slice(0, 3).map(Number);
    if (cells.length < 3 || ![x, y, z].every(Number.isFinite)) {
      return { elements: [], error: `Line ${i + 1} ("${line}") needs three numbers x, y, z in metres.` };
    }
    const channel = cells[3] !== undefined ? Number(cells[3]) : elements.length;
    const gain = cells[4] !== undefined ? Number(cells[4]) : 1;
    if (!Number.isInteger(channel) || channel < 0) return { elements: [], error: `Line ${i + 1}: the channel must be a whole number from 0.` };
    if (!(gain > 0)) return { elements: [], error: `Line ${i + 1}: the gain must be a positive number.` };
    elements.push({ position: [x, y, z], channel, gain, excluded: /^excluded$/i.test(cells[5] ?? '') });
  }
  return { elements, error: elements.length ? null : 'Enter at least one element.' };
}

/** Line-array builder: count elements, spacing apart along an axis, from an origin. */
export function buildLine(count: number, spacingM: number, axis: 'x' | 'y' | 'z', origin: [number, number, number]): ArrayElement[] {
  const k = axis === 'x' ? 0 : axis === 'y' ? 1 : 2;
  return Array.from({ length: count }, (_, i) => {
    const p: [number, number, number] = [...origin];
    p[k] += i * spacingM;
    return { position: p, channel: i, gain: 1, excluded: false };
  });
}
