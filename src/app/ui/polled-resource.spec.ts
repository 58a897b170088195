import { Component, signal } from '@angular/core';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { type Observable, defer, of, throwError } from 'rxjs';
import { polledResource } from './polled-resource';

interface Job {
  id: string;
  state: 'running' | 'done';
  step: number;
}

const EVERY_MS = 1000;

/** A panel that polls one job; each ask takes the next queued reply (or fails with it). */
@Component({ selector: 'app-poll-host', template: '' })
class PollHost {
  readonly id = signal<string | undefined>('job-1');
  readonly asked: string[] = [];
  readonly replies: (Job | Error)[] = [];
  readonly job = polledResource({
    params: () => this.id(),
    load: (id: string): Observable<Job> =>
      defer(() => {
        this.asked.push(id);
        const reply = this.replies.shift() ?? new Error(`no reply queued for ask ${this.asked.length}`);
        return reply instanceof Error ? throwError(() => reply) : of(reply);
      }),
    everyMs: EVERY_MS,
    running: (job: Job) => job.state === 'running',
  });
}

describe('polledResource', () => {
  let fixture: ComponentFixture<PollHost>;
  let host: PollHost;

  beforeEach(() => {
    jest.useFakeTimers();
    fixture = TestBed.createComponent(PollHost);
    host = fixture.componentInstance;
  });

  afterEach(() => jest.useRealTimers());

  /** Renders (the resource starts on change detection) and lets `ms` pass. */
  async function pass(ms: number): Promise<void> {
    fixture.detectChanges();
    await jest.advanceTimersByTimeAsync(ms);
  }

  it('asks at once, again every interval while the answer says running, and never again once it says done', async () => {
    host.replies.push({ id: 'job-1', state: 'running', step: 1 }, { id: 'job-1', state: 'running', step: 2 }, { id: 'job-1', state: 'done', step: 3 });
    await pass(0);
    expect(host.asked).toEqual(['job-1']);
    expect(host.job.value()).toEqual({ id: 'job-1', state: 'running', step: 1 });
    expect(host.job.polling()).toBe(true);

    await pass(EVERY_MS);
    expect(host.job.value()?.step).toBe(2);
    await pass(EVERY_MS);
    expect(host.job.value()).toEqual({ id: 'job-1', state: 'done', step: 3 });
    expect(host.job.polling()).toBe(false);

    await pass(EVERY_MS * 10);
    expect(host.asked).toEqual(['job-1', 'job-1', 'job-1']);
  });

  it('keeps the last answer through a failed poll, stops, and asks again at once on reload()', async () => {
    host.replies.push({ id: 'job-1', state: 'running', step: 1 }, new Error('The server is not answering.'));
    await pass(0);
    await pass(EVERY_MS);
    expect(host.job.error()?.message).toBe('The server is not answering.');
    expect(host.job.value()).toEqual({ id: 'job-1', state: 'running', step: 1 });
    expect(host.job.polling()).toBe(false);
    await pass(EVERY_MS * 5);
    expect(host.asked).toHaveLength(2);

    host.replies.push({ id: 'job-1', state: 'done', step: 2 });
    host.job.reload();
    await pass(0);
    expect(host.asked).toHaveLength(3);
    expect(host.job.error()).toBeUndefined();
    expect(host.job.value()).toEqual({ id: 'job-1', state: 'done', step: 2 });
  });

  it('starts a new round on reload() after the work was done (a new request queued more)', async () => {
    host.replies.push({ id: 'job-1', state: 'done', step: 1 }, { id: 'job-1', state: 'running', step: 2 }, { id: 'job-1', state: 'done', step: 3 });
    await pass(0);
    expect(host.job.polling()).toBe(false);

    host.job.reload();
    expect(host.job.polling()).toBe(true);
    await pass(0);
    expect(host.job.value()?.step).toBe(2);
    await pass(EVERY_MS);
    expect(host.job.value()?.step).toBe(3);
    await pass(EVERY_MS * 5);
    expect(host.asked).toHaveLength(3);
  });

  it('shows a set() answer until the next poll replaces it', async () => {
    host.replies.push({ id: 'job-1', state: 'running', step: 1 }, { id: 'job-1', state: 'done', step: 3 });
    await pass(0);
    host.job.set({ id: 'job-1', state: 'running', step: 2 });
    expect(host.job.value()?.step).toBe(2);
    await pass(EVERY_MS);
    expect(host.job.value()).toEqual({ id: 'job-1', state: 'done', step: 3 });
  });

  it('forgets the old answer and starts over for new params', async () => {
    host.replies.push({ id: 'job-1', state: 'running', step: 1 });
    await pass(0);
    host.id.set('job-2');
    fixture.detectChanges();
    expect(host.job.value()).toBeUndefined();
    host.replies.push({ id: 'job-2', state: 'done', step: 1 });
    await pass(0);
    expect(host.asked).toEqual(['job-1', 'job-2']);
    expect(host.job.value()).toEqual({ id: 'job-2', state: 'done', step: 1 });
  });

  it('stops asking when its component is destroyed', async () => {
    host.replies.push({ id: 'job-1', state: 'running', step: 1 }, { id: 'job-1', state: 'running', step: 2 });
    await pass(0);
    fixture.destroy();
    await jest.advanceTimersByTimeAsync(EVERY_MS * 10);
    expect(host.asked).toEqual(['job-1']);
  });
});
