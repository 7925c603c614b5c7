// Shutdown hooks: services that buffer work (metering, queues) register a flush here; run once, in reverse order.
type Hook = () => Promise<void> | void;
const hooks: Hook[] = [];

export function onShutdown(hook: Hook): void {
  hooks.push(hook);
}

export async function runShutdownHooks(): Promise<void> {
  for (const hook of hooks.splice(0).reverse()) {
    try {
      await hook();
    } catch (error) {
      console.error('shutdown hook failed:', (error as Error).message);
    }
  }
}
