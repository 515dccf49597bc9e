import { ChangeDetectionStrategy, Component } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { FormControl, ReactiveFormsModule, Validators } from '@angular/forms';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatError, MatFormField, MatLabel } from '@angular/material/form-field';
import { MatInput } from '@angular/material/input';
import { FieldError, fieldErrorMessage } from './field-error';

describe('fieldErrorMessage', () => {
  it('says nothing for a control without errors', () => {
    expect(fieldErrorMessage(null)).toBeNull();
    expect(fieldErrorMessage({})).toBeNull();
  });

  it("uses the field's own words where it gives them, and one wording everywhere otherwise", () => {
    expect(fieldErrorMessage({ required: true }, { required: 'Name the model' })).toBe('Name the model');
    expect(fieldErrorMessage({ required: true })).toBe('Fill in this field');
    expect(fieldErrorMessage({ maxlength: { requiredLength: 120, actualLength: 121 } })).toBe('Use at most 120 characters');
    expect(fieldErrorMessage({ minlength: { requiredLength: 10, actualLength: 3 } })).toBe('Use at least 10 characters');
    expect(fieldErrorMessage({ min: { min: 1900, actual: 1850 } })).toBe('Use 1900 or more');
    expect(fieldErrorMessage({ max: { max: 2200, actual: 2300 } })).toBe('Use 2200 or less');
    expect(fieldErrorMessage({ min: { min: 1900, actual: 1850 } }, { min: 'Use a year from 1900 to 2200' })).toBe('Use a year from 1900 to 2200');
    expect(fieldErrorMessage({ email: true })).toBe('Enter an e-mail address such as name@example.org');
  });

  it('says a message carried by the error as it is: the shared schema first, the server last', () => {
    expect(fieldErrorMessage({ schema: 'Use at most 3 letters' })).toBe('Use at most 3 letters');
    expect(fieldErrorMessage({ server: 'A farm with this code exists' })).toBe('A farm with this code exists');
    expect(fieldErrorMessage({ server: 'Taken', schema: 'Too long' })).toBe('Too long');
    expect(fieldErrorMessage({ server: 'Taken', required: true }, { required: 'Enter a code' })).toBe('Enter a code');
    expect(fieldErrorMessage({ mismatch: true })).toBe('Check this value');
  });
});

@Component({
  imports: [ReactiveFormsModule, MatFormField, MatLabel, MatInput, MatError, FieldError],
  template: `
    <mat-form-field>
      <mat-label>Code</mat-label>
      <input matInput [formControl]="code" />
      <mat-error><np-field-error [control]="code" required="Enter a code" /></mat-error>
    </mat-form-field>
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
class Host {
  readonly code = new FormControl('', [Validators.required, Validators.maxLength(3)]);
}

describe('FieldError', () => {
  it('follows the control: the required message, then the length, then a server message set later', async () => {
    const fixture = TestBed.createComponent(Host);
    const field = await TestbedHarnessEnvironment.loader(fixture).getHarness(MatFormFieldHarness);
    const code = fixture.componentInstance.code;
    code.markAsTouched();
    await fixture.whenStable();
    expect(await field.getTextErrors()).toEqual(['Enter a code']);

    code.setValue('F2100');
    await fixture.whenStable();
    expect(await field.getTextErrors()).toEqual(['Use at most 3 characters']);

    code.setValue('F21');
    code.setErrors({ server: 'A farm with the code “F21” exists already' });
    await fixture.whenStable();
    expect(await field.getTextErrors()).toEqual(['A farm with the code “F21” exists already']);

    code.setValue('F22');
    await fixture.whenStable();
    expect(await field.getTextErrors()).toEqual([]);
  });
});
