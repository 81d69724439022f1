import { MultiBar, Presets, type SingleBar } from 'cli-progress';
import type { CaptureDto } from '@earmark/contracts';
import type { CaptureFile } from './capture-file.js';

/** What `earmark submit` tells the person (or CI log) watching stderr while it works. */
export interface SubmitProgress {
  /** A line of news (build created, retrying…) that must not tear a bar apart. */
  note(line: string): void;
  uploadStarted(file: CaptureFile): void;
  uploadBytes(sent: number): void;
  uploadDone(file: CaptureFile, capture: CaptureDto, reused: boolean): void;
  waitStarted(total: number, timeoutMs: number): void;
  waitUpdate(done: number, total: number): void;
  /** Ends any bar (and restores the cursor); safe to call at any time. */
  stop(): void;
}

export function formatBytes(bytes: number): string {
  if (bytes < 1024) return `${bytes} B`;
  if (bytes < 1024 * 1024) return `${(bytes / 1024).toFixed(1)} KiB`;
  return `${(bytes / 1024 / 1024).toFixed(1)} MiB`;
}

const uploadedLine = (file: CaptureFile, capture: CaptureDto, reused: boolean): string =>
  `uploaded ${file.name} (${formatBytes(file.sizeBytes)}) as capture ${capture.id}${reused ? ', already there from an earlier run' : ''}`;

/** For logs and pipes: whole lines only, one per finished step. */
export class PlainProgress implements SubmitProgress {
  constructor(private readonly out: NodeJS.WritableStream) {}
  note(line: string): void {
    this.out.write(`earmark: ${line}\n`);
  }
  uploadStarted(): void {}
  uploadBytes(): void {}
  uploadDone(file: CaptureFile, capture: CaptureDto, reused: boolean): void {
    this.note(uploadedLine(file, capture, reused));
  }
  waitStarted(total: number, timeoutMs: number): void {
    this.note(`waiting for ${total} verdict${total === 1 ? '' : 's'} (up to ${timeoutMs / 1000} s)`);
  }
  waitUpdate(done: number, total: number): void {
    this.note(`analysed ${done}/${total}`);
  }
  stop(): void {}
}

/** For a terminal: a live upload bar per file and an analysis counter that redraws in place. */
export class TerminalProgress implements SubmitProgress {
  private bars: MultiBar | undefined;
  private bar: SingleBar | undefined;

  constructor(private readonly out: NodeJS.WritableStream) {}

  note(line: string): void {
    if (this.bars) this.bars.log(`earmark: ${line}\n`);
    else this.out.write(`earmark: ${line}\n`);
  }

  uploadStarted(file: CaptureFile): void {
    this.open('uploading {file} |{bar}| {percentage}% {sent}/{size}');
    this.bar = this.bars?.create(file.sizeBytes, 0, { file: file.name, sent: formatBytes(0), size: formatBytes(file.sizeBytes) });
  }

  uploadBytes(sent: number): void {
    this.bar?.update(sent, { sent: formatBytes(sent) });
  }

  uploadDone(file: CaptureFile, capture: CaptureDto, reused: boolean): void {
    this.bar?.update(file.sizeBytes, { sent: formatBytes(file.sizeBytes) });
    this.close();
    this.note(uploadedLine(file, capture, reused));
  }

  waitStarted(total: number): void {
    this.open('analysing {value}/{total} |{bar}| {duration_formatted}');
    this.bar = this.bars?.create(total, 0);
  }

  waitUpdate(done: number): void {
    this.bar?.update(done);
  }

  stop(): void {
    this.close();
  }

  private open(format: string): void {
    this.close();
    this.bars = new MultiBar({ format, stream: this.out, barsize: 24, hideCursor: true, clearOnComplete: false, stopOnComplete: false }, Presets.shades_classic);
  }

  private close(): void {
    this.bars?.stop();
    this.bars = undefined;
    this.bar = undefined;
  }
}

/** Bars when stderr is a terminal; plain lines in CI logs, where redraws would be noise. */
export function createSubmitProgress(stream: NodeJS.WriteStream): SubmitProgress {
  return stream.isTTY ? new TerminalProgress(stream) : new PlainProgress(stream);
}
