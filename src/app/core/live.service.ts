import { Injectable, signal } from '@angular/core';
import { Observable, Subject, defer, filter, finalize, map, repeat, retry, share, timer } from 'rxjs';
import { webSocket, type WebSocketSubject } from 'rxjs/webSocket';
import { LIVE_PATH, liveServerMessageSchema, type LiveClientMessage, type LiveServerMessage, type LiveTopic } from '../../../shared/api/live.js';

/** 'live' while the socket is open; 'connecting' before the first open; 'down' between attempts. */
export type LiveStatus = 'connecting' | 'live' | 'down';

/** Reconnect delay after the n-th failed attempt: 0.5 s doubling to 15 s, ±20 % jitter (common practice). */
export function reconnectDelayMs(attempt: number, random = Math.random): number {
  const base = Math.min(15_000, 500 * 2 ** Math.min(attempt, 10));
  return Math.round(base * (0.8 + 0.4 * random()));
}

/**
 * The browser's one live channel (rxjs/webSocket): opened while anything watches it and closed
 * when nothing does, reconnected with exponential back-off, re-subscribed to every watched
 * topic after each reconnect. `opened$` fires after every (re)connect, so pages reload their
 * state from the REST API and miss nothing that happened while the socket was down.
 */
@Injectable({ providedIn: 'root' })
export class LiveService {
  private readonly statusSignal = signal<LiveStatus>('connecting');
  /** Connection state for the indicator. */
  readonly status = this.statusSignal.asReadonly();
  /** When the socket was last open (ms since epoch), for "down since". */
  readonly downSince = signal<number | null>(null);

  private readonly openedSubject = new Subject<void>();
  /** Fires after every successful (re)connect, once the subscriptions are re-sent. */
  readonly opened$ = this.openedSubject.asObservable();

  private socket: WebSocketSubject<unknown> | null = null;
  private failures = 0;
  private readonly watched = new Map<LiveTopic, number>();
  private readonly fromWindow = new Map<LiveTopic, number>();

  private readonly messages$: Observable<LiveServerMessage> = defer(() => {
    const url = `${location.protocol === 'https:' ? 'wss' : 'ws'}://${location.host}${LIVE_PATH}`;
    const ws = webSocket<unknown>({
      url,
      openObserver: {
        next: () => {
          this.failures = 0;
          this.statusSignal.set('live');
          this.downSince.set(null);
          this.resubscribe();
          this.openedSubject.next();
        },
      },
      closeObserver: { next: () => this.markDown() },
    });
    this.socket = ws;
    return ws;
  }).pipe(
    // An error (refused, network) or a clean close (server restart) both lead to a new attempt.
    retry({ delay: () => timer(reconnectDelayMs(this.failures++)) }),
    repeat({ delay: () => timer(reconnectDelayMs(this.failures++)) }),
    map((raw) => liveServerMessageSchema.safeParse(raw)),
    filter((r) => r.success),
    map((r) => r.data),
    finalize(() => {
      this.socket = null;
      this.statusSignal.set('connecting');
    }),
    share(),
  );

  /**
   * Messages of the given topics while subscribed. `fromWindow` (for 'job:<id>') names the
   * first window the caller does not have; it may change later through setFromWindow().
   */
  watch(topics: LiveTopic[], fromWindow?: Partial<Record<LiveTopic, number>>): Observable<LiveServerMessage> {
    return new Observable<LiveServerMessage>((subscriber) => {
      for (const t of topics) {
        this.watched.set(t, (this.watched.get(t) ?? 0) + 1);
        const w = fromWindow?.[t];
        if (w !== undefined) this.fromWindow.set(t, w);
      }
      const inner = this.messages$.subscribe(subscriber);
      this.send({ type: 'subscribe', topics, ...(fromWindow ? { fromWindow: fromWindow as Record<string, number> } : {}) });
      return () => {
        const gone: LiveTopic[] = [];
        for (const t of topics) {
          const n = (this.watched.get(t) ?? 1) - 1;
          if (n <= 0) {
            this.watched.delete(t);
            this.fromWindow.delete(t);
            gone.push(t);
          } else this.watched.set(t, n);
        }
        if (gone.length) this.send({ type: 'unsubscribe', topics: gone });
        inner.unsubscribe();
      };
    });
  }

  /** Remembers how far a job's windows are loaded, for the resubscription after a reconnect. */
  setFromWindow(topic: LiveTopic, window: number): void {
    if (this.watched.has(topic)) this.fromWindow.set(topic, window);
  }

  private resubscribe(): void {
    const topics = [...this.watched.keys()];
    if (!topics.length) return;
    this.send({ type: 'subscribe', topics, fromWindow: Object.fromEntries(this.fromWindow) });
  }

  private send(message: LiveClientMessage): void {
    // Before the socket opens, rxjs buffers the message; resubscribe() repeats it anyway.
    if (this.socket && this.statusSignal() === 'live') this.socket.next(message);
  }

  private markDown(): void {
    if (this.statusSignal() !== 'down') this.downSince.set(Date.now());
    this.statusSignal.set('down');
  }
}
