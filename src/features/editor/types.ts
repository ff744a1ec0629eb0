// Props shared by the lazy wrapper and the editor itself (kept free of Monaco imports so the
// rest of the client can use them without pulling Monaco into its chunk).

export type MarkTone = 'error' | 'warning' | 'info' | 'waived';

/** Lines to tint, 1-based and inclusive, e.g. the lines of one finding. `focus` is the one being read. */
export interface HighlightRange {
  startLine: number;
  endLine: number;
  tone: MarkTone | 'focus';
}

/** A glyph in the gutter beside a line, with the text shown on hover (e.g. a finding's message). */
export interface GutterMark {
  line: number;
  tone: MarkTone;
  label: string;
  /** Passed back to `onMarkClick`, e.g. the finding's id. */
  id?: string;
}

export interface NetlistEditorProps {
  value: string;
  /** File name within the netlist set; becomes the model's path so each file keeps its own state. */
  fileName?: string;
  /** Read-only unless told otherwise: Keepwell shows netlists, it does not edit them. */
  readOnly?: boolean;
  highlights?: HighlightRange[];
  marks?: GutterMark[];
  /** Scroll this line into the middle of the view whenever it changes. */
  revealLine?: number;
  onMarkClick?: (mark: GutterMark) => void;
  onChange?: (value: string) => void;
  /** CSS height of the editor; the default fills the parent. */
  height?: string | number;
  /** Accessible name of the editor, e.g. `Netlist rf_bank.sp`. */
  ariaLabel?: string;
  className?: string;
  /**
   * Every file of the netlist set, the shown one included, for go-to-definition: from an `X`
   * instance to the `.subckt` it names, in whichever file defines it.
   */
  files?: NetlistFileText[];
  /** Keeps the editor models of different netlist sets apart (e.g. the run's id). */
  workspaceId?: string;
  /** A definition lives in another file of `files`: show that file; the editor then puts the cursor on it. */
  onOpenFile?: (path: string) => void;
  /** The reader asked for the next or previous finding (F8 / Shift+F8, or the context menu). */
  onNavigateFinding?: (direction: 'next' | 'previous') => void;
}

export interface NetlistFileText {
  path: string;
  text: string;
}
