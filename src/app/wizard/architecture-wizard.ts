import { ChangeDetectionStrategy, ChangeDetectorRef, Component, ErrorHandler, effect, inject, input, signal, untracked } from '@angular/core';
import { ReactiveFormsModule } from '@angular/forms';
import { MatButton, MatIconButton } from '@angular/material/button';
import { MatCheckbox } from '@angular/material/checkbox';
import { MatDialog } from '@angular/material/dialog';
import { MatError, MatFormField, MatHint, MatLabel, MatSuffix } from '@angular/material/form-field';
import { MatIcon } from '@angular/material/icon';
import { MatInput } from '@angular/material/input';
import { MatOption, MatSelect } from '@angular/material/select';
import { Router, RouterLink } from '@angular/router';
import { architecture } from '../../../shared/architecture.js';
import { formatPath } from '../../../shared/model-file.js';
import type { DeviceSummary } from '../../../shared/api/devices.js';
import type { Sif } from '../../../shared/api/sifs.js';
import { generateModels } from '../../../solver/generator/index.js';
import { numberMessage } from '../canvas/properties/typed-number';
import { DevicePickerDialog, type DevicePickerDialogData } from '../devices/device-picker-dialog';
import { ModelRecords } from '../models/model-records';
import { SifRecords } from '../register/sif-records';
import { INTERVAL_UNITS, INTERVAL_UNIT_LABELS, RATE_UNITS, RATE_UNIT_LABELS } from '../units/units';
import {
  SUBSYSTEM_ROLE_LABELS,
  architectureFromForm,
  buildSubsystemForm,
  buildWizardForm,
  linkDevice,
  linkedDifferences,
  restoreLibraryValues,
  subsystemLinks,
  unlinkDevice,
  type LinkedDifference,
  type SubsystemForm,
  type SubsystemRole,
  type WizardForm,
} from './wizard-form';
import { linkGeneratedEvents } from './wizard-links';

/**
 * The architecture wizard: subsystems (sensors, logic, final elements) in series, each with its voting,
 * devices, test plan and common cause. The solver's generator writes the fault tree (and, on request,
 * the equivalent state model) from it; the user then goes on editing the fault tree on the canvas. A
 * device picked from the library stays linked: every channel event of its subsystem links to the version
 * picked, as a pick on the canvas does (the state model has no events, so it carries the figures only).
 */
@Component({
  selector: 'pl-architecture-wizard',
  imports: [
    ReactiveFormsModule,
    RouterLink,
    MatButton,
    MatIconButton,
    MatIcon,
    MatCheckbox,
    MatFormField,
    MatLabel,
    MatError,
    MatHint,
    MatSuffix,
    MatInput,
    MatSelect,
    MatOption,
  ],
  templateUrl: './architecture-wizard.html',
  styleUrl: './architecture-wizard.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ArchitectureWizard {
  private readonly records = inject(ModelRecords);
  private readonly sifs = inject(SifRecords);
  private readonly router = inject(Router);
  private readonly errorHandler = inject(ErrorHandler);
  private readonly dialog = inject(MatDialog);
  private readonly changeDetector = inject(ChangeDetectorRef);

  readonly projectId = input.required<string>();
  readonly sifId = input.required<string>();

  protected readonly sif = signal<Sif | null>(null);
  protected readonly form = signal<WizardForm>(buildWizardForm('New function', 87_600, 'low'));
  protected readonly problems = signal<readonly string[]>([]);
  protected readonly warnings = signal<readonly string[]>([]);
  protected readonly busy = signal(false);
  protected readonly roles: readonly SubsystemRole[] = ['sensors', 'logic', 'finalElements'];
  protected readonly roleLabels = SUBSYSTEM_ROLE_LABELS;
  protected readonly rateUnits = RATE_UNITS;
  protected readonly rateUnitLabels = RATE_UNIT_LABELS;
  protected readonly intervalUnits = INTERVAL_UNITS;
  protected readonly intervalUnitLabels = INTERVAL_UNIT_LABELS;
  protected readonly message = numberMessage;

  constructor() {
    effect(() => {
      const [projectId, sifId] = [this.projectId(), this.sifId()];
      untracked(() => void this.load(projectId, sifId));
    });
  }

  private async load(projectId: string, sifId: string): Promise<void> {
    try {
      const sif = await this.sifs.get(projectId, sifId);
      this.sif.set(sif);
      this.form.set(buildWizardForm(`${sif.tag} from the architecture`, sif.missionHours, sif.demandMode));
    } catch (error) {
      this.errorHandler.handleError(error);
    }
  }

  protected addSubsystem(role: SubsystemRole): void {
    const subsystems = this.form().controls.subsystems;
    const prefix = role === 'sensors' ? 'S' : role === 'logic' ? 'L' : 'F';
    const taken = new Set(subsystems.controls.map((group) => group.controls.id.value));
    let number = 1;
    while (taken.has(`${prefix}${number}`)) number++;
    subsystems.push(buildSubsystemForm(role, `${prefix}${number}`));
  }

  /** Links the subsystem's device to a library record's current version; its figures fill in (the repair time stays as typed). */
  protected pickDevice(subsystem: SubsystemForm): void {
    const data: DevicePickerDialogData = { linkedId: subsystem.controls.device.value?.deviceId ?? null };
    this.dialog
      .open<DevicePickerDialog, DevicePickerDialogData, DeviceSummary>(DevicePickerDialog, { data, width: '720px', maxWidth: '95vw' })
      .afterClosed()
      .subscribe((device) => {
        if (!device) return;
        linkDevice(subsystem, device);
        this.changeDetector.markForCheck();
      });
  }

  protected unlinkDevice(subsystem: SubsystemForm): void {
    unlinkDevice(subsystem);
  }

  protected restoreLibraryValues(subsystem: SubsystemForm): void {
    restoreLibraryValues(subsystem);
  }

  protected differences(subsystem: SubsystemForm): LinkedDifference[] {
    return linkedDifferences(subsystem);
  }

  protected removeSubsystem(index: number): void {
    this.form().controls.subsystems.removeAt(index);
  }

  /** Checks the answers, writes the model(s) through the generator and opens the fault tree. */
  protected async write(): Promise<void> {
    const form = this.form();
    form.markAllAsDirty();
    this.problems.set([]);
    if (form.invalid) {
      this.problems.set(['Some fields are not filled in correctly; each says what is wrong under it.']);
      return;
    }
    const checked = architecture.safeParse(architectureFromForm(form));
    if (!checked.success) {
      this.problems.set(checked.error.issues.map((issue) => `${describeArchitecturePath(issue.path)}: ${issue.message}`));
      return;
    }
    const { links, problems } = subsystemLinks(form);
    if (problems.length > 0) {
      this.problems.set(problems);
      return;
    }
    let generated: ReturnType<typeof generateModels>;
    let faultTree: ReturnType<typeof generateModels>['faultTree'];
    try {
      generated = generateModels(checked.data);
      faultTree = linkGeneratedEvents(generated.faultTree, links);
    } catch (error) {
      this.problems.set([error instanceof Error ? error.message : String(error)]);
      return;
    }
    this.warnings.set(generated.warnings);
    this.busy.set(true);
    try {
      const tree = await this.records.create(this.projectId(), this.sifId(), faultTree);
      if (form.controls.writeStateModel.value) await this.records.create(this.projectId(), this.sifId(), { ...generated.markov, name: `${generated.markov.name} (state model)` });
      await this.router.navigate(['/projects', this.projectId(), 'sifs', this.sifId(), 'models', tree.id]);
    } catch (error) {
      this.errorHandler.handleError(error);
    } finally {
      this.busy.set(false);
    }
  }
}

/** "groups[1].voting" as the wizard says it: "Subsystem 2, voting". */
export function describeArchitecturePath(path: readonly PropertyKey[]): string {
  if (path[0] === 'groups' && typeof path[1] === 'number') {
    const rest = path.slice(2).filter((part) => part !== 'channels' && part !== 'identical');
    return `Subsystem ${path[1] + 1}${rest.length > 0 ? `, ${formatPath(rest)}` : ''}`;
  }
  return formatPath(path);
}
