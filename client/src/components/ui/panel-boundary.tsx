import { Component, type ErrorInfo, type ReactNode } from 'react';
import { Button } from './button';

type Props = {
  /** Names the panel in the fallback, e.g. "Score history". */
  title: string;
  children: ReactNode;
  /** Called before the panel renders again, e.g. to reset a failed query. */
  onReset?: () => void;
};

type State = { error: Error | null };

/**
 * Catches a render error in one secondary panel so the rest of the screen
 * stays usable. Route-level errors go to the route's errorElement instead.
 */
export class PanelBoundary extends Component<Props, State> {
  override state: State = { error: null };

  static getDerivedStateFromError(error: Error): State {
    return { error };
  }

  override componentDidCatch(error: Error, info: ErrorInfo): void {
    console.error(`Panel "${this.props.title}" failed`, error, info.componentStack);
  }

  private reset = () => {
    this.props.onReset?.();
    this.setState({ error: null });
  };

  override render() {
    if (!this.state.error) return this.props.children;
    return (
      <div role="alert" className="rounded border border-border bg-surface p-3 text-sm">
        <p className="font-medium text-text">{this.props.title} could not be shown.</p>
        <p className="mt-1 text-xs text-muted">The rest of the screen still works. {this.state.error.message}</p>
        <Button size="sm" className="mt-2" onClick={this.reset}>
          Try again
        </Button>
      </div>
    );
  }
}
