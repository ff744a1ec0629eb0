// Go-to-definition for netlists in Monaco: one definition provider for the SPICE language and
// one editor opener, shared by every editor on the page. Each editor registers the files of its
// netlist set (a workspace) under its models' addresses; the provider finds the `.subckt` an
// instance names in any of them, and the opener hands a jump into another file back to the
// editor that asked, which switches files.

import { findDefinition, indexSubcircuits, type Definition, type NetlistText } from './definitions';
import { monaco } from './monaco-setup';
import { SPICE_LANGUAGE_ID } from './spice-language';

export interface Workspace {
  files: readonly NetlistText[];
  index: Map<string, Definition>;
  /** The model address of a file of the workspace. */
  uriOf: (path: string) => monaco.Uri;
  pathOf: (uri: monaco.Uri) => string | undefined;
}

const workspaces = new Map<string, Workspace>();
const openers = new WeakMap<monaco.editor.ICodeEditor, (path: string, position: monaco.IPosition) => boolean>();
let installed = false;

function install() {
  if (installed) return;
  installed = true;
  monaco.languages.registerDefinitionProvider(SPICE_LANGUAGE_ID, {
    provideDefinition(model, position) {
      const workspace = workspaces.get(model.uri.toString());
      const path = workspace?.pathOf(model.uri);
      if (!workspace || path === undefined) return null;
      const files = workspace.files.map((f) => (f.path === path ? { path, text: model.getValue() } : f));
      const found = findDefinition(files, path, position.lineNumber, position.column, workspace.index);
      if (!found) return null;
      const { reference, definition } = found;
      return [
        {
          uri: workspace.uriOf(definition.path),
          range: new monaco.Range(definition.line, definition.column, definition.line, definition.column + definition.name.length),
          originSelectionRange: new monaco.Range(reference.line, reference.startColumn, reference.line, reference.endColumn),
        },
      ];
    },
  });
  monaco.editor.registerEditorOpener({
    openCodeEditor(source, resource, selectionOrPosition) {
      const workspace = workspaces.get(resource.toString());
      const path = workspace?.pathOf(resource);
      const open = openers.get(source);
      if (!workspace || path === undefined || !open) return false;
      const position =
        selectionOrPosition && 'startLineNumber' in selectionOrPosition
          ? { lineNumber: selectionOrPosition.startLineNumber, column: selectionOrPosition.startColumn }
          : (selectionOrPosition ?? { lineNumber: 1, column: 1 });
      return open(path, position);
    },
  });
}

/** Make a workspace's files known to the provider; returns the undo. */
export function registerWorkspace(files: readonly NetlistText[], uriOf: (path: string) => monaco.Uri): () => void {
  install();
  const byUri = new Map(files.map((f) => [uriOf(f.path).toString(), f.path]));
  const workspace: Workspace = { files, index: indexSubcircuits(files), uriOf, pathOf: (uri) => byUri.get(uri.toString()) };
  for (const key of byUri.keys()) workspaces.set(key, workspace);
  return () => {
    for (const key of byUri.keys()) if (workspaces.get(key) === workspace) workspaces.delete(key);
  };
}

/** Route jumps into other files of an editor's workspace to `open` (return true when handled). */
export function registerOpener(editor: monaco.editor.ICodeEditor, open: (path: string, position: monaco.IPosition) => boolean): void {
  install();
  openers.set(editor, open);
}
