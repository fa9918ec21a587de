import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'
import type { AnaemiaCriteria, AnaemiaSeverity, IronStatus } from '../../shared/clinical'
import type { Priority, Stage } from '../../shared/pathway'

/**
 * One surgical episode. The screening outcome (latest Hb, iron status, proposal) is kept on
 * this row, updated in the same transaction as each new result, so the worklist is a single
 * indexed SELECT even with hundreds of thousands of results.
 */
export class Referral extends Model<InferAttributes<Referral>, InferCreationAttributes<Referral>> {
  declare id: CreationOptional<number>
  declare patientId: number
  declare procedureId: number
  declare surgeonId: number
  declare plannedSurgeryDate: string
  declare priority: Priority
  declare referringSource: string | null
  declare stage: Stage
  declare version: CreationOptional<number>
  declare anaemic: boolean | null
  declare anaemiaSeverity: AnaemiaSeverity | null
  declare anaemiaCriteria: AnaemiaCriteria
  declare ironStatus: IronStatus | null
  declare proposedStage: Stage | null
  declare latestHbGL: number | null
  declare latestHbAt: Date | null
  // Filled by the clinic work (prescriptions, re-checks); nullable until then.
  declare recheckDueDate: CreationOptional<string | null>
  declare treatmentOrderedAt: CreationOptional<Date | null>
  declare treatmentGivenAt: CreationOptional<Date | null>
  /** Set at clinic review; selects the 80 g/L transfusion trigger in the projection. */
  declare cardiovascularDisease: CreationOptional<boolean>
  /** The surgeon asked for the date to move; the clinic sees a flag until the date changes. */
  declare dateChangeRequestedAt: CreationOptional<Date | null>
  /** Positive red-cell antibody screen; null until recorded. */
  declare redCellAntibodies: CreationOptional<boolean | null>
  declare declinesTransfusion: CreationOptional<boolean>
  /** Worklist flags from measured Hb after iron (services/ironResponse.ts keeps them). */
  declare noResponseToIron: CreationOptional<boolean>
  declare hbFallingAfterIron: CreationOptional<boolean>
  /** The decision to operate (listing for surgery); screening lead time is measured from it too. */
  declare listingDate: CreationOptional<string | null>
  /** The theatre system's placer appointment id (HL7 SIU SCH-1/SCH-2) of the booked operation. */
  declare placerAppointmentId: CreationOptional<string | null>
  /** Earlier planned dates, each with when and why it moved (theatre bookings keep it). */
  declare surgeryDateHistory: CreationOptional<
    { from: string | null; to: string | null; at: string; reason: string | null; source: string }[] | null
  >
  declare createdBy: number | null
  declare createdAt: CreationOptional<Date>
  declare updatedAt: CreationOptional<Date>
}

export function initReferral(sequelize: Sequelize): void {
  Referral.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      patientId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      procedureId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      surgeonId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      plannedSurgeryDate: { type: DataTypes.DATEONLY, allowNull: false },
      priority: { type: DataTypes.STRING(10), allowNull: false, defaultValue: 'routine' },
      referringSource: { type: DataTypes.STRING(200), allowNull: true },
      stage: { type: DataTypes.STRING(12), allowNull: false, defaultValue: 'referred' },
      version: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 1 },
      anaemic: { type: DataTypes.BOOLEAN, allowNull: true },
      anaemiaSeverity: { type: DataTypes.STRING(10), allowNull: true },
      anaemiaCriteria: { type: DataTypes.STRING(10), allowNull: false },
      ironStatus: { type: DataTypes.STRING(20), allowNull: true },
      proposedStage: { type: DataTypes.STRING(12), allowNull: true },
      latestHbGL: { type: DataTypes.DOUBLE, allowNull: true, field: 'latest_hb_gl' },
      latestHbAt: { type: DataTypes.DATE, allowNull: true },
      recheckDueDate: { type: DataTypes.DATEONLY, allowNull: true },
      treatmentOrderedAt: { type: DataTypes.DATE, allowNull: true },
      treatmentGivenAt: { type: DataTypes.DATE, allowNull: true },
      cardiovascularDisease: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      dateChangeRequestedAt: { type: DataTypes.DATE, allowNull: true },
      redCellAntibodies: { type: DataTypes.BOOLEAN, allowNull: true },
      declinesTransfusion: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      noResponseToIron: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      hbFallingAfterIron: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      listingDate: { type: DataTypes.DATEONLY, allowNull: true },
      placerAppointmentId: { type: DataTypes.STRING(80), allowNull: true },
      surgeryDateHistory: { type: DataTypes.JSON, allowNull: true },
      createdBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'referrals' },
  )
}
