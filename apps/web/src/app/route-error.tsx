import { Component, type ReactNode } from 'react';
import { useRouteError } from 'react-router-dom';
import { ErrorState } from '@/components/ui/states';

/** Keeps a failing screen from blanking the app: it shows what went wrong and a way back. */
export class RouteErrorBoundary extends Component<{ children: ReactNode }, { error: unknown }> {
  override state = { error: null as unknown };
  static getDerivedStateFromError(error: unknown) {
    return { error };
  }
  override render() {
    if (this.state.error) {
      return <ErrorState title="This screen hit a problem" error={this.state.error} onRetry={() => this.setState({ error: null })} />;
    }
    return this.props.children;
  }
}

export function RouterErrorElement() {
  const error = useRouteError();
  return (
    <div className="p-6">
      <ErrorState title="This page could not be shown" error={error} onRetry={() => window.location.reload()} />
    </div>
  );
}
