import { describe, expect, it } from 'vitest';
import { ModelService } from './model.service';

/** A ModelService whose build is a controllable stand-in, to watch the scheduling alone. */
function scheduler() {
  const service = new ModelService(
    ...(Array.from({ length: 6 }, () => ({})) as ConstructorParameters<typeof ModelService>),
  );
  const builds: { announced: string[]; finish: (ok?: boolean) => void }[] = [];
  let running = 0;
  let overlapped = false;
  (service as unknown as { buildOnce: (a: string[]) => Promise<void> }).buildOnce = (announced) =>
    new Promise<void>((resolve, reject) => {
      running++;
      if (running > 1) overlapped = true;
      builds.push({
        announced,
        finish: (ok = true) => {
          running--;
          if (ok) resolve();
          else reject(new Error('the database went away'));
        },
      });
    });
  const announce = (id: string) =>
    (service as unknown as { announced: Set<string> }).announced.add(id);
  return { service, builds, announce, overlapped: () => overlapped };
}

const tick = () => new Promise((r) => setImmediate(r));

describe('model rebuilds', () => {
  it('run one at a time, and requests during a build cause exactly one more', async () => {
    const { service, builds, announce, overlapped } = scheduler();
    announce('import-1');
    const first = service.rebuild();
    await tick();
    expect(builds).toHaveLength(1);
    announce('import-2');
    const second = service.rebuild();
    announce('import-3');
    const third = service.rebuild();
    await tick();
    expect(builds).toHaveLength(1);
    builds[0].finish();
    await tick();
    expect(builds).toHaveLength(2);
    expect(builds[1].announced.sort()).toEqual(['import-2', 'import-3']);
    builds[1].finish();
    await Promise.all([first, second, third]);
    expect(builds).toHaveLength(2);
    expect(overlapped()).toBe(false);
  });

  it('start afresh after an idle spell, and keep what a failed build announced for the next', async () => {
    const { service, builds, announce } = scheduler();
    announce('import-1');
    const failed = service.rebuild();
    await tick();
    builds[0].finish(false);
    await failed;
    announce('import-2');
    const next = service.rebuild();
    await tick();
    expect(builds).toHaveLength(2);
    expect(builds[1].announced.sort()).toEqual(['import-1', 'import-2']);
    builds[1].finish();
    await next;
  });
});
