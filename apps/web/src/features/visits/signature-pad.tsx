import { useEffect, useId, useRef, useState } from 'react';
import SignaturePad from 'signature_pad';
import { Eraser } from 'lucide-react';
import { Button } from '@/components/ui/button';
import { appNow } from '@/lib/now';

/** What the pad holds: the drawn signature as PNG data (base64, no `data:` prefix) and when it was last drawn on. */
export interface DrawnSignature {
  imagePng: string;
  signedAt: string;
}

/** Highest pixel density the pad draws at: a 390 px phone at 2× gives a PNG of about 700 × 320 px (well under 200 KB). */
const MAX_RATIO = 2;
const PNG_PREFIX = 'data:image/png;base64,';

/**
 * A signature pad (signature_pad) the customer signs with a finger, stylus or mouse: full width, one hand, a
 * "Clear" button. The canvas is labelled for screen readers and says it needs touch or a mouse; its state
 * (empty or signed) is announced. `onChange` hears the PNG after each stroke and null once cleared.
 */
export function SignaturePadField({
  label,
  onChange,
  error,
}: {
  label: string;
  onChange(s: DrawnSignature | null): void;
  error?: string | null;
}) {
  const canvasRef = useRef<HTMLCanvasElement>(null);
  const padRef = useRef<SignaturePad | null>(null);
  const changeRef = useRef(onChange);
  const [empty, setEmpty] = useState(true);
  const id = useId();

  useEffect(() => {
    changeRef.current = onChange;
  }, [onChange]);

  useEffect(() => {
    const canvas = canvasRef.current!;
    const pad = new SignaturePad(canvas, { penColor: '#17212B', minWidth: 0.8, maxWidth: 2.6 });
    padRef.current = pad;
    /** Sizes the drawing surface to the element at the screen's density, keeping what is drawn. */
    const fit = () => {
      const ratio = Math.min(Math.max(window.devicePixelRatio || 1, 1), MAX_RATIO);
      const { width, height } = canvas.getBoundingClientRect();
      if (!width || !height) return;
      const strokes = pad.toData();
      canvas.width = Math.round(width * ratio);
      canvas.height = Math.round(height * ratio);
      canvas.getContext('2d')!.scale(ratio, ratio);
      pad.clear();
      if (strokes.length) pad.fromData(strokes);
    };
    fit();
    const ended = () => {
      if (pad.isEmpty()) return;
      setEmpty(false);
      changeRef.current({ imagePng: pad.toDataURL('image/png').slice(PNG_PREFIX.length), signedAt: appNow().toISOString() });
    };
    pad.addEventListener('endStroke', ended);
    const observer = typeof ResizeObserver === 'undefined' ? null : new ResizeObserver(fit);
    observer?.observe(canvas);
    return () => {
      observer?.disconnect();
      pad.removeEventListener('endStroke', ended);
      pad.off();
      padRef.current = null;
    };
  }, []);

  const clear = () => {
    padRef.current?.clear();
    setEmpty(true);
    changeRef.current(null);
  };

  return (
    <div className="flex flex-col gap-1">
      <span id={`${id}-label`} className="text-sm font-medium">
        {label}
      </span>
      <canvas
        ref={canvasRef}
        role="img"
        aria-labelledby={`${id}-label`}
        aria-describedby={`${id}-help ${id}-state`}
        className={`h-40 w-full rounded-md border-2 border-dashed bg-white ${error ? 'border-alarm' : 'border-slate-line'}`}
      />
      <div className="flex items-start justify-between gap-3">
        <p id={`${id}-help`} className="text-xs text-slate">
          The customer signs in the box with a finger, stylus or mouse; the pad cannot be used with a keyboard or screen reader. If the
          customer cannot sign here, choose “Customer not available”.
        </p>
        <Button type="button" variant="secondary" size="lg" onClick={clear} disabled={empty} className="shrink-0">
          <Eraser className="size-4" aria-hidden="true" /> Clear
        </Button>
      </div>
      <p id={`${id}-state`} role="status" className="text-sm">
        {empty ? 'The pad is empty.' : 'Signature drawn.'}
      </p>
      {error && <p className="text-sm text-alarm">{error}</p>}
    </div>
  );
}
