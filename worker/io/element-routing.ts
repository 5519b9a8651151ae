/**
 * Which file channel feeds each delivered channel, and with what gain: the array description's
 * channel map, exclusions and calibration folded into two small typed arrays, validated once.
 */
import type { ArrayGeometry } from '../../shared/arrays/array-geometry.js';
import type { RecordingDescription } from '../../shared/formats/recording-description.js';

export interface FrameSourceOptions {
  /** For each element, the file channel that feeds it (0-based). Default: the side file's channel_order, else element e ← channel e for every file channel. */
  elementChannels?: readonly number[];
  /** Elements (indices into elementChannels) left out of the delivered channels. */
  excludedElements?: readonly number[];
  /** Linear gain per element (calibration), multiplied into its samples. Default 1. */
  elementGains?: readonly number[];
  /** Size of the one reused read buffer in bytes (default 8 MiB). */
  bufferBytes?: number;
}

export interface ElementRouting {
  /** Delivered channel o reads file channel fileChannel[o]. */
  fileChannel: Int32Array;
  /** Delivered channel o is element element[o] of the array. */
  element: Int32Array;
  /** Gain applied to delivered channel o: element gain × side-file channel gain × side-file scale. */
  gain: Float64Array;
}

/** The options an array description implies (channel map, exclusions, gains). */
export function frameSourceOptionsFromArray(array: ArrayGeometry): FrameSourceOptions {
  return {
    elementChannels: array.elements.map((e) => e.channel),
    excludedElements: array.elements.flatMap((e, i) => (e.excluded ? [i] : [])),
    elementGains: array.elements.map((e) => e.gain),
  };
}

export class ChannelMapError extends Error {
  override readonly name = 'ChannelMapError';
}

export function buildElementRouting(d: RecordingDescription, options: FrameSourceOptions = {}): ElementRouting {
  const map = options.elementChannels ?? d.elementChannels ?? Array.from({ length: d.channels }, (_, i) => i);
  if (map.length === 0) throw new ChannelMapError('The channel map is empty; give one file channel per array element.');
  const seen = new Set<number>();
  map.forEach((c, e) => {
    if (!Number.isInteger(c) || c < 0 || c >= d.channels) {
      throw new ChannelMapError(`Element ${e} is mapped to channel ${c}, but ${d.fileName} has channels 0 to ${d.channels - 1}. Correct the element's channel in the array description.`);
    }
    if (seen.has(c)) throw new ChannelMapError(`Channel ${c} of ${d.fileName} feeds two elements; give each element its own channel.`);
    seen.add(c);
  });
  const excluded = new Set<number>();
  for (const e of options.excludedElements ?? []) {
    if (!Number.isInteger(e) || e < 0 || e >= map.length) throw new ChannelMapError(`Excluded element ${e} does not exist (elements 0 to ${map.length - 1}).`);
    excluded.add(e);
  }
  const gains = options.elementGains;
  if (gains && gains.length !== map.length) throw new ChannelMapError(`${gains.length} element gains given for ${map.length} elements; give one per element.`);
  const active = map.map((_, e) => e).filter((e) => !excluded.has(e));
  if (active.length === 0) throw new ChannelMapError('Every element is excluded; keep at least one.');
  const routing: ElementRouting = { fileChannel: new Int32Array(active.length), element: new Int32Array(active.length), gain: new Float64Array(active.length) };
  active.forEach((e, o) => {
    const g = gains ? gains[e] : 1;
    if (!(Number.isFinite(g) && g > 0)) throw new ChannelMapError(`Element ${e} has gain ${g}; gains must be positive numbers.`);
    const fc = map[e];
    routing.fileChannel[o] = fc;
    routing.element[o] = e;
    routing.gain[o] = g * (d.channelGains ? d.channelGains[fc] : 1) * d.scale;
  });
  return routing;
}
