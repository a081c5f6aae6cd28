import * as vscode from 'vscode';

/**
 * Base for host objects that own listeners: everything registered through `_register` is
 * disposed once, in reverse order, and `isDisposed` lets async methods stop after an await.
 */
export abstract class Disposable implements vscode.Disposable {
  #isDisposed = false;
  readonly #owned: vscode.Disposable[] = [];

  get isDisposed(): boolean {
    return this.#isDisposed;
  }

  dispose(): void {
    if (this.#isDisposed) return;
    this.#isDisposed = true;
    for (const item of this.#owned.splice(0).reverse()) {
      try { item.dispose(); } catch (error) { console.error('metric-triage: dispose failed', error); }
    }
  }

  protected _register<T extends vscode.Disposable>(item: T): T {
    if (this.#isDisposed) item.dispose(); else this.#owned.push(item);
    return item;
  }
}
