import {
  ChangeDetectionStrategy,
  Component,
  ElementRef,
  computed,
  inject,
  input,
  signal,
  viewChild,
} from '@angular/core';
import { takeUntilDestroyed, toObservable } from '@angular/core/rxjs-interop';
import { FormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCardModule } from '@angular/material/card';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { MatSelectModule } from '@angular/material/select';
import { RouterLink } from '@angular/router';
import {
  carrierStatusLabels,
  shipmentPhotoLimits,
  shipmentStateLabels,
  type ShipmentDetail,
  type ShipmentPhoto,
} from '@evalon/contracts';
import { catchError, concatMap, from, of, switchMap, toArray, type Observable } from 'rxjs';
import { ApiError, messageOf } from '../../core/api-error';
import { Notifier } from '../../core/notifier';
import { Cautions } from '../../shared/cautions/cautions';
import { EmptyState } from '../../shared/empty-state/empty-state';
import { DayPipe } from '../../shared/formats';
import { PageHeader } from '../../shared/page-header/page-header';
import { ShipmentApi } from './shipment-api';

/** One line of the shipment's history: state changes, carrier events, alerts and scans. */
export interface HistoryLine {
  at: string;
  icon: string;
  text: string;
  tone: 'normal' | 'refused' | 'muted';
  by: string | null;
}

/** Merges timeline events and scans, newest first. */
export function historyOf(s: ShipmentDetail): HistoryLine[] {
  const lines: HistoryLine[] = [
    ...s.events.map((e) => ({
      at: e.occurredAt,
      icon: e.kind === 'carrier' ? 'local_shipping' : e.kind === 'alert' ? 'notifications' : 'flag',
      text: e.message,
      tone: (e.ignored ? 'muted' : 'normal') as HistoryLine['tone'],
      by: e.by,
    })),
    ...s.scans.map((x) => ({
      at: x.at,
      icon:
        x.outcome === 'refused'
          ? 'block'
          : x.outcome === 'manual'
            ? 'edit_note'
            : 'qr_code_scanner',
      text:
        x.outcome === 'refused'
          ? `Scan refused: ${x.message}`
          : x.outcome === 'manual'
            ? `Ticked by hand: ${x.message}`
            : `Scanned ${x.gtin ?? ''}${x.lot ? ` lot ${x.lot}` : ''}${x.serial ? ` serial ${x.serial}` : ''}${x.expiry ? ` exp. ${x.expiry}` : ''}`,
      tone: (x.outcome === 'refused' ? 'refused' : 'normal') as HistoryLine['tone'],
      by: x.by,
    })),
  ];
  return lines.sort((a, b) => b.at.localeCompare(a.at));
}

/** A finding being written on the inspection form. */
interface FindingDraft {
  category: string;
  note: string;
  /** In major units as typed; sent in minor units. */
  charge: number;
  needsRepair: boolean;
  /** Photos uploaded for this finding, sent as `photoIds`. */
  photos: ShipmentPhoto[];
}

/** Types the server keeps; the file picker offers only these. */
export const photoAccept = 'image/jpeg,image/png,image/webp';

/**
 * Why a chosen file cannot be a shipment photo, or null. A first check in the browser so the
 * person hears at once; the server decides from the bytes.
 */
export function photoProblem(file: File): string | null {
  if (file.size === 0) return `${file.name} is empty.`;
  if (file.size > shipmentPhotoLimits.maxBytes) {
    return `${file.name} is larger than ${shipmentPhotoLimits.maxBytes / (1024 * 1024)} MB.`;
  }
  if (!photoAccept.split(',').includes(file.type)) {
    return `${file.name} is not a JPEG, PNG or WebP photo.`;
  }
  return null;
}

/**
 * `/shipments/:id`: one leg with its checklist, the scan field (a keyboard-wedge scanner types
 * into it and sends Enter; the camera button reads a code with the device camera), the steps
 * the person may take now, and the history.
 */
@Component({
  selector: 'ev-shipment-page',
  imports: [
    Cautions,
    DayPipe,
    EmptyState,
    FormsModule,
    MatButtonModule,
    MatCardModule,
    MatFormFieldModule,
    MatIconModule,
    MatInputModule,
    MatProgressBarModule,
    MatSelectModule,
    PageHeader,
    RouterLink,
  ],
  templateUrl: './shipment-page.html',
  styleUrl: './shipment-page.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ShipmentPage {
  private readonly api = inject(ShipmentApi);
  private readonly notifier = inject(Notifier);

  /** Route parameter. */
  readonly id = input.required<string>();

  protected readonly labels = shipmentStateLabels;
  protected readonly carrierLabels = carrierStatusLabels;
  protected readonly shipment = signal<ShipmentDetail | null>(null);
  protected readonly loadError = signal<string | null>(null);
  protected readonly busy = signal(false);
  protected readonly raw = signal('');
  protected readonly lastScan = signal<{ ok: boolean; text: string } | null>(null);
  protected readonly cameraOn = signal(false);
  protected readonly manualFor = signal<number | null>(null);
  protected readonly manualReason = signal('');
  protected readonly receiptNotes = signal('');
  protected readonly missing = signal<number[]>([]);
  protected readonly decon = signal({ method: '', by: '', at: '' });
  protected readonly findings = signal<FindingDraft[]>([]);
  protected readonly history = computed(() => {
    const s = this.shipment();
    return s ? historyOf(s) : [];
  });
  protected readonly can = (action: string) => this.shipment()?.actions.includes(action) ?? false;
  protected readonly photoAccept = photoAccept;
  protected readonly limits = shipmentPhotoLimits;
  protected readonly receiptPhotos = computed(
    () => this.shipment()?.photos.filter((p) => p.kind === 'receipt') ?? [],
  );
  protected readonly findingPhotos = computed(
    () => this.shipment()?.photos.filter((p) => p.kind === 'finding' && p.findingId) ?? [],
  );
  protected readonly photoUrl = (photoId: number) => this.api.photoUrl(Number(this.id()), photoId);

  private readonly scanField = viewChild<ElementRef<HTMLInputElement>>('scanField');
  private readonly video = viewChild<ElementRef<HTMLVideoElement>>('video');
  private stopCamera: (() => void) | null = null;

  constructor() {
    toObservable(this.id)
      .pipe(
        switchMap((id) =>
          this.api.get(Number(id)).pipe(
            catchError((err: unknown) => {
              this.loadError.set(messageOf(err));
              return of(null);
            }),
          ),
        ),
        takeUntilDestroyed(),
      )
      .subscribe((s) => {
        if (s) this.shipment.set(s);
      });
  }

  private reload(): void {
    this.api.get(Number(this.id())).subscribe((s) => this.shipment.set(s));
  }

  private run<T>(call: Observable<T>, done: (value: T) => void): void {
    this.busy.set(true);
    call.subscribe({
      next: (value) => {
        this.busy.set(false);
        done(value);
      },
      error: (err: unknown) => {
        this.busy.set(false);
        this.notifier.error(err);
      },
    });
  }

  /** Sends what the scanner typed (on Enter) and keeps the field focused for the next scan. */
  protected submitScan(text = this.raw()): void {
    const raw = text.trim() ? text.replace(/[\r\n]+$/, '') : '';
    if (!raw) return;
    this.raw.set('');
    this.api.scan(Number(this.id()), raw).subscribe({
      next: (r) => {
        this.lastScan.set({
          ok: true,
          text: `${r.item.name}: ${r.item.scanned} of ${r.item.quantity}`,
        });
        this.reload();
        this.scanField()?.nativeElement.focus();
      },
      error: (err: unknown) => {
        const code = err instanceof ApiError ? ` (${err.code})` : '';
        this.lastScan.set({ ok: false, text: `${messageOf(err)}${code}` });
        this.reload();
        this.scanField()?.nativeElement.focus();
      },
    });
  }

  /** Reads one code with the camera; the decoder loads only when asked for. */
  protected async camera(): Promise<void> {
    if (this.cameraOn()) {
      this.stopCamera?.();
      this.cameraOn.set(false);
      return;
    }
    this.cameraOn.set(true);
    try {
      const { BrowserMultiFormatReader } = await import('@zxing/browser');
      const reader = new BrowserMultiFormatReader();
      const video = this.video()?.nativeElement;
      const controls = await reader.decodeFromVideoDevice(undefined, video, (result, _e, c) => {
        if (!result) return;
        c.stop();
        this.cameraOn.set(false);
        this.submitScan(result.getText());
      });
      this.stopCamera = () => controls.stop();
    } catch (err) {
      this.cameraOn.set(false);
      this.notifier.error(err);
    }
  }

  /** What a line must record, in words. */
  protected needs(i: ShipmentDetail['checklist'][number]): string {
    const words = [i.needsLot && 'lot', i.needsSerial && 'serial', i.needsExpiry && 'expiry'];
    return words.filter((w) => w).join(', ') || '–';
  }

  protected tickByHand(itemId: number): void {
    this.run(this.api.tickByHand(Number(this.id()), itemId, this.manualReason()), (s) => {
      this.manualFor.set(null);
      this.manualReason.set('');
      this.shipment.set(s);
    });
  }

  protected pack(): void {
    this.run(this.api.pack(Number(this.id())), (s) => {
      this.shipment.set(s);
      this.notifier.success(`Packed. SSCC ${s.sscc}.`);
    });
  }

  protected handOver(): void {
    this.run(this.api.handOver(Number(this.id())), (s) => {
      this.shipment.set(s);
      this.notifier.success(`Handed to the carrier: ${s.trackingNumber}.`);
    });
  }

  protected receive(): void {
    this.run(this.api.receive(Number(this.id())), (r) => {
      this.shipment.set(r.shipment);
      this.notifier.success(
        r.missing.length
          ? `Received; missing: ${r.missing.join(', ')}.`
          : 'Received; nothing missing.',
      );
    });
  }

  protected confirmReceipt(): void {
    this.run(
      this.api.receipt(Number(this.id()), {
        missingItemIds: this.missing(),
        notes: this.receiptNotes(),
      }),
      (s) => this.shipment.set(s),
    );
  }

  protected toggleMissing(itemId: number, on: boolean): void {
    this.missing.update((m) => (on ? [...m, itemId] : m.filter((x) => x !== itemId)));
  }

  protected attest(): void {
    const d = this.decon();
    const at = d.at ? new Date(d.at).toISOString() : new Date().toISOString();
    this.run(this.api.decontamination(Number(this.id()), { ...d, at }), (s) =>
      this.shipment.set(s),
    );
  }

  protected patchDecon(patch: Partial<{ method: string; by: string; at: string }>): void {
    this.decon.update((d) => ({ ...d, ...patch }));
  }

  protected addFinding(): void {
    this.findings.update((f) => [
      ...f,
      { category: 'damage', note: '', charge: 0, needsRepair: false, photos: [] },
    ]);
  }

  protected patchFinding(i: number, patch: Partial<FindingDraft>): void {
    this.findings.update((f) => f.map((x, j) => (j === i ? { ...x, ...patch } : x)));
  }

  protected inspect(): void {
    const s = this.shipment()!;
    // Charges are typed in major units; the currencies on this board have two decimals (ISO 4217).
    const findings = this.findings().map(({ photos, ...f }) => ({
      ...f,
      charge: Math.round(Number(f.charge) * 100),
      photoIds: photos.map((p) => p.id),
    }));
    this.run(this.api.inspect(s.loanId, findings), () => {
      this.findings.set([]);
      this.reload();
      this.notifier.success('Inspection recorded.');
    });
  }

  /**
   * Uploads the chosen photos one after another (the server counts them against the limit) and
   * hands the stored ones on. Files the browser can already tell are wrong are not sent.
   */
  private uploadPhotos(input: HTMLInputElement, room: number, done: (p: ShipmentPhoto[]) => void) {
    const files = Array.from(input.files ?? []);
    input.value = '';
    const problems = files.map(photoProblem).filter((p): p is string => p !== null);
    if (problems.length > 0) {
      this.notifier.error(problems.join(' '));
      return;
    }
    if (files.length === 0) return;
    if (files.length > room) {
      this.notifier.error(`Choose at most ${room} more photo${room === 1 ? '' : 's'}.`);
      return;
    }
    const id = Number(this.id());
    this.run(
      from(files).pipe(
        concatMap((f) => this.api.uploadPhoto(id, f)),
        toArray(),
      ),
      done,
    );
  }

  protected addReceiptPhotos(event: Event): void {
    const room = this.limits.perReceipt - this.receiptPhotos().length;
    this.uploadPhotos(event.target as HTMLInputElement, room, () => this.reload());
  }

  protected addFindingPhotos(i: number, event: Event): void {
    const room = this.limits.perFinding - this.findings()[i].photos.length;
    this.uploadPhotos(event.target as HTMLInputElement, room, (added) =>
      this.patchFinding(i, { photos: [...this.findings()[i].photos, ...added] }),
    );
  }

  protected settle(): void {
    const s = this.shipment()!;
    this.run(this.api.settle(s.loanId), (r) => {
      const f = (n: number) => (n / 100).toFixed(2);
      this.notifier.success(
        `Deposit settled: ${f(r.settlement.kept)} kept, ${f(r.settlement.returned)} returned ${r.settlement.currency}; loan closed.`,
      );
      this.reload();
    });
  }
}
