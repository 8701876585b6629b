import { Component, type ErrorInfo, type ReactNode } from "react";
import { QueryClientProvider, type QueryClient } from "@tanstack/react-query";
import { SettingsProvider } from "@/lib/settings";

/** Catches what escapes the router's own error boundaries (a crash in a provider, say). */
class TopLevelErrorBoundary extends Component<{ children: ReactNode }, { error: Error | null }> {
  state = { error: null as Error | null };

  static getDerivedStateFromError(error: Error) {
    return { error };
  }

  componentDidCatch(error: Error, info: ErrorInfo) {
    console.error("Thetafold stopped on an unexpected error", error, info.componentStack);
  }

  render() {
    if (!this.state.error) return this.props.children;
    return (
      <div role="alert" className="mx-auto max-w-lg px-6 py-20">
        <h1 className="text-xl font-semibold text-ink">Thetafold stopped on an unexpected error</h1>
        <p className="mt-2 text-sm text-ink-muted">Nothing you saved is lost. Reload the page to carry on.</p>
        <pre className="mt-4 overflow-auto rounded-lg bg-sunken p-3 font-mono text-xs text-ink">{this.state.error.message}</pre>
        <button type="button" className="mt-4 rounded-lg bg-ember px-4 py-2 text-sm font-medium text-on-ember" onClick={() => window.location.reload()}>
          Reload
        </button>
      </div>
    );
  }
}

/** The app's context: one QueryClient (passed in, so tests give each test its own), display settings, a last-resort error boundary. */
export function Providers({ queryClient, children }: { queryClient: QueryClient; children: ReactNode }) {
  return (
    <TopLevelErrorBoundary>
      <QueryClientProvider client={queryClient}>
        <SettingsProvider>{children}</SettingsProvider>
      </QueryClientProvider>
    </TopLevelErrorBoundary>
  );
}
