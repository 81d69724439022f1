// The entry of every compute thread: loads the pool's task module (through tsx when it is
// TypeScript, in development and tests) and runs the task a message names.
const modules = new Map();

async function load(path) {
  if (!modules.has(path)) {
    modules.set(path, (async () => {
      if (path.endsWith('.ts')) (await import('tsx/esm/api')).register();
      return import(path);
    })());
  }
  return modules.get(path);
}

export default async function run({ module, task, input }) {
  const tasks = await load(module);
  if (typeof tasks[task] !== 'function') throw new Error(`The compute module has no task "${task}".`);
  return tasks[task](input);
}
