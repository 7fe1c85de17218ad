import { Component, type ErrorInfo, type ReactNode } from 'react';
import { ErrorPanel } from '../ui/status';

type Props = { children: ReactNode; label?: string };
type State = { error: unknown };

/** Keeps one broken panel from taking the whole page down. */
export class WidgetBoundary extends Component<Props, State> {
  override state: State = { error: null };

  static getDerivedStateFromError(error: unknown): State {
    return { error };
  }

  override componentDidCatch(error: unknown, info: ErrorInfo): void {
    console.error(`Panel ${this.props.label ?? ''} failed`, error, info.componentStack);
  }

  override render() {
    if (this.state.error)
      return <ErrorPanel error={this.state.error} onRetry={() => this.setState({ error: null })} />;
    return this.props.children;
  }
}
