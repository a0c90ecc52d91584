/**
 * `thinfoil merge <dir>...`: combine the output folders of the n shards of
 * one `identify --shard k/n` or `render --shard k/n` run into the output of
 * one run (src/cli/shard.ts checks that they belong together).
 */
import { readShards } from './shard.js';
import { progressBar } from './progress.js';

export interface MergeOptions {
  out?: string;
  json?: boolean;
  progressJson?: boolean;
}

export async function mergeCommand(dirs: string[], opts: MergeOptions): Promise<void> {
  const shards = readShards(dirs);
  if (shards[0].manifest.kind === 'render') {
    const { mergeRender } = await import('./renderCommand.js');
    await mergeRender(shards, opts.out, opts.json === true);
    return;
  }
  const { mergeIdentify, printIdentify } = await import('./identifyCommand.js');
  const bar = progressBar({ jsonLines: opts.progressJson === true });
  let out: Awaited<ReturnType<typeof mergeIdentify>>;
  try {
    out = await mergeIdentify(shards, opts.out, undefined, (msg, f) => bar.update(msg.length > 48 ? `${msg.slice(0, 45)}...` : msg, f));
  } finally {
    bar.done();
  }
  printIdentify(out, opts.json === true);
}
