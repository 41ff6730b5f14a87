import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { errorText } from '../shared/form-paths';
import { energyBlockGroup, type SeasonGroup } from './rate-plan-form';

/** A season's tiered energy: monthly kWh blocks, each changing the price of its kWh. */
@Component({
  selector: 'ny-energy-blocks',
  imports: [MatButtonModule, MatFormFieldModule, MatIconModule, MatInputModule, ReactiveFormsModule],
  templateUrl: './energy-blocks.html',
  styleUrls: ['../shared/panel.scss', './rate-rows.scss'],
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class EnergyBlocks {
  readonly season = input.required<SeasonGroup>();
  /** The season's position from 0, shown from 1. */
  readonly index = input.required<number>();

  protected readonly error = errorText;

  protected add(): void {
    // The last block stays open-ended: the one before it gets an end.
    const blocks = this.season().controls.energyBlocks;
    if (!blocks.length) blocks.push(energyBlockGroup({ uptoKwh: null, adder: 0 }));
    blocks.push(energyBlockGroup({ uptoKwh: null, adder: 0 }));
  }
}
