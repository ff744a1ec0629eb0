// Choosing an exported deck file (JSON). The server validates the content and names
// each offending field; here it is only read and parsed.

import { useRef, useState } from 'react';
import { Button } from '../../components/Button';
import { Notice } from '../../components/Notice';

function readText(file: File): Promise<string> {
  return new Promise((resolve, reject) => {
    const reader = new FileReader();
    reader.onload = () => resolve(String(reader.result));
    reader.onerror = () => reject(reader.error);
    reader.readAsText(file);
  });
}

export function ImportButton({ label, onContent, busy = false }: { label: string; onContent: (content: unknown, fileName: string) => void; busy?: boolean }) {
  const input = useRef<HTMLInputElement>(null);
  const [problem, setProblem] = useState<string | null>(null);
  return (
    <>
      <input
        ref={input}
        type="file"
        accept="application/json,.json"
        className="sr-only"
        tabIndex={-1}
        aria-label={`${label}: deck file`}
        onChange={async (e) => {
          const file = e.target.files?.[0];
          e.target.value = '';
          if (!file) return;
          try {
            const content: unknown = JSON.parse(await readText(file));
            setProblem(null);
            onContent(content, file.name);
          } catch {
            setProblem(`${file.name} is not a JSON file. Export a version from a deck’s page to get one.`);
          }
        }}
      />
      <Button busy={busy} onClick={() => input.current?.click()}>
        {label}
      </Button>
      {problem && (
        <Notice tone="error" className="basis-full">
          {problem}
        </Notice>
      )}
    </>
  );
}
