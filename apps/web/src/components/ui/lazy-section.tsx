import { Component, lazy, Suspense, type ComponentType, type ReactNode } from 'react';
import { Card } from './page';
import { ErrorState, LoadingState } from './states';

/**
 * A section of a screen loaded as its own chunk, after the screen shows: what lies below the fold (the Visit
 * screen's readings, findings, refrigerant, photos and close-out) stays out of the JavaScript the first view
 * waits for.
 * While it loads, its card shows its title and a loading state; if its chunk cannot be fetched, an error
 * state with "Try again" (which fetches it again). The service worker precaches every chunk, so offline the
 * section loads from the phone.
 *
 *   const FindingsSection = lazySection('Findings', () => import('./findings-section').then((m) => m.FindingsSection));
 */
export function lazySection<P extends object>(title: string, load: () => Promise<ComponentType<P>>) {
  const fresh = () =>
    lazy(() =>
      load().then(
        (Section) => ({ default: Section }),
        (e: unknown) => {
          throw new Error(
            `This part of the screen did not arrive (${e instanceof Error ? e.message : 'no answer'}). Try again when the connection is back.`,
          );
        },
      ),
    );
  let Loaded = fresh();
  const placeholder = (children: ReactNode) => <Card title={title}>{children}</Card>;

  function LazySection(props: P) {
    return (
      <SectionBoundary title={title} wrap={placeholder} onRetry={() => (Loaded = fresh())}>
        <Suspense fallback={placeholder(<LoadingState label={`Loading ${title.toLowerCase()}…`} />)}>
          <Loaded {...props} />
        </Suspense>
      </SectionBoundary>
    );
  }
  LazySection.displayName = `LazySection(${title})`;
  /** Starts fetching the chunk (e.g. while the screen's data loads); rendering later finds it loaded. */
  LazySection.preload = () => void load().catch(() => undefined);
  return LazySection;
}

interface BoundaryProps {
  title: string;
  wrap(children: ReactNode): ReactNode;
  /** Called before rendering again: a failed chunk's import is made afresh (React keeps a failed lazy failed). */
  onRetry(): void;
  children: ReactNode;
}

/** Catches a section that failed to load (or to render) so the rest of the screen stays usable. */
class SectionBoundary extends Component<BoundaryProps, { error: unknown }> {
  override state: { error: unknown } = { error: null };

  static getDerivedStateFromError(error: unknown) {
    return { error };
  }

  override render() {
    if (this.state.error === null) return this.props.children;
    return this.props.wrap(
      <ErrorState
        title={`${this.props.title} could not be loaded`}
        error={this.state.error}
        onRetry={() => {
          this.props.onRetry();
          this.setState({ error: null });
        }}
      />,
    );
  }
}
