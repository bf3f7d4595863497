import { lazy, Suspense, type ComponentType } from "react";
import { LoadingState } from "@/components/ui/state-views";

/**
 * A component whose code is fetched the first time it is drawn. The web export puts each
 * `import()` in its own file, so the first screen does not carry code it does not show.
 */
export function suspended<P extends object>(load: () => Promise<{ default: ComponentType<P> }>, label?: string) {
  const Lazy = lazy(load) as unknown as ComponentType<P>;
  return function Suspended(props: P) {
    return (
      <Suspense fallback={<LoadingState label={label} />}>
        <Lazy {...props} />
      </Suspense>
    );
  };
}

/** A route screen loaded on its first visit. */
export function lazyRoute(load: () => Promise<{ default: ComponentType }>) {
  return suspended(load);
}
