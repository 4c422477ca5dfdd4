"use client";
import { useActionState } from "react";
import type { CreateTokenState } from "./actions.ts";

/** Creates a token and shows its secret once (the server returns it in this response only). */
export function CreateTokenForm({ action }: { action: (prev: CreateTokenState, fd: FormData) => Promise<CreateTokenState> }) {
  const [state, formAction, pending] = useActionState(action, null);
  return (
    <>
      {state && "secret" in state ? (
        <div className="notice" role="status">
          <p>
            Token <strong>{state.prefix}…</strong> ({state.scope}
            {state.name ? `, ${state.name}` : ""}) created. Copy it now: it is shown this once and cannot be shown again.
          </p>
          <p className="secret" aria-label="New API token">
            {state.secret}
          </p>
          <p className="muted">Send it as the header: Authorization: Bearer &lt;token&gt;</p>
        </div>
      ) : null}
      {state && "error" in state ? (
        <p className="notice bad" role="alert">
          {state.error}
        </p>
      ) : null}
      <form action={formAction} className="panel form-row">
        <div>
          <label htmlFor="token-name">Name (what uses it)</label>
          <input id="token-name" name="name" maxLength={100} placeholder="e.g. total station logger" />
        </div>
        <div>
          <label htmlFor="token-scope">Scope</label>
          <select id="token-scope" name="scope" defaultValue="ingest">
            <option value="ingest">ingest: post epochs (and read)</option>
            <option value="read">read: read only</option>
          </select>
        </div>
        <div>
          <button type="submit" disabled={pending}>
            {pending ? "Creating…" : "Create token"}
          </button>
        </div>
      </form>
    </>
  );
}
