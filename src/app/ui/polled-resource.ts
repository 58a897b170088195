import { type Signal, computed, signal, untracked } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { type Observable, Subject, defer, exhaustMap, finalize, startWith, switchMap, takeWhile, tap, timer } from 'rxjs';

/** What a polling panel reads: the last answer, the failure, and whether it is still asking. */
export interface PolledResource<T> {
  /** The last answer; kept through a failed poll (undefined before the first answer for these params). */
  readonly value: Signal<T | undefined>;
  /** The failure that stopped the polling, if one did (read it with `loadErrorMessage`). */
  readonly error: Signal<Error | undefined>;
  /** The first answer after a change of params (or after `reload()` from a failure) is awaited. */
  readonly isLoading: Signal<boolean>;
  /** Still asking: from the start of a round until an answer says the work is done (or it fails). */
  readonly polling: Signal<boolean>;
  /** `Date.now()` when the last answer arrived (0 before one), so a clock on screen moves with each poll. */
  readonly answeredAt: Signal<number>;
  /** Starts a new round: asks at once, then every interval while the work runs (Try again, Refresh, after a POST). */
  reload(): void;
  /** Stores an answer that changes what was loaded (a POST's own answer) until the next answer replaces it. */
  set(value: T): void;
}

export interface PolledResourceOptions<T, P> {
  /** What is asked for (an id); a change starts over, `undefined` asks nothing. */
  params: () => P | undefined;
  /** One request. */
  load: (params: P) => Observable<T>;
  /** The interval between asks, in ms. */
  everyMs: number;
  /** True while the answer says the work goes on (a run solving, notices queued): asked again after `everyMs`. */
  running: (value: T) => boolean;
}

/**
 * A resource that asks at once and again every `everyMs` while `running(answer)` holds, then stops.
 * A change of params, `reload()` or the component's end stops the round in progress. A slow answer
 * is waited for, never overtaken (`exhaustMap`: a tick while a request is out is skipped). Built on
 * `rxResource` (its params, its error, its end with the component); each answer is stored as it
 * arrives, so a component test sees it on the next `detectChanges()`. The polling panels (a run
 * solving, its checks and explanation, the notices' delivery) load through it.
 */
export function polledResource<T, P>(options: PolledResourceOptions<T, P>): PolledResource<T> {
  const restart = new Subject<void>();
  const latest = signal<{ params: P; value: T } | undefined>(undefined);
  const answeredAt = signal(0);
  const polling = signal(false);
  const resource = rxResource<T, P | undefined>({
    params: options.params,
    stream: ({ params }) =>
      restart.pipe(
        startWith(undefined),
        switchMap(() =>
          defer(() => {
            polling.set(true);
            return timer(0, options.everyMs);
          }).pipe(
            exhaustMap(() => options.load(params)),
            tap((value) => {
              latest.set({ params, value });
              answeredAt.set(Date.now());
            }),
            takeWhile((value) => options.running(value), true),
            finalize(() => polling.set(false)),
          ),
        ),
      ),
  });
  return {
    // The last answer for the params asked now, kept through a failed poll and a new round.
    value: computed(() => {
      const last = latest();
      return last !== undefined && last.params === options.params() ? last.value : undefined;
    }),
    error: resource.error,
    isLoading: resource.isLoading,
    polling: polling.asReadonly(),
    answeredAt: answeredAt.asReadonly(),
    // A failure ends the stream: the resource loads afresh. Otherwise the running stream starts a new round.
    reload: () => (untracked(resource.status) === 'error' ? void resource.reload() : restart.next()),
    set: (value: T) => {
      const params = untracked(options.params);
      if (params !== undefined) latest.set({ params, value });
    },
  };
}
