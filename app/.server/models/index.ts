export { User, ROLES, publicUser, type Role, type PublicUser } from "./user";
export { AuthSession, PasswordReset, RecoveryCode, StudioSetting } from "./auth";
export { CoachAthlete, Invitation } from "./roster";
export { OutboundEmail } from "./email";
export { Session, SessionBlock, SeasonPlan, PlanWeek, PlanItem, PlanRecurrence } from "./plans";
export { Threshold, Assignment, ScheduledSession, ScheduledBlock, type SessionStatus } from "./calendar";
export { Upload, FieldTest, RescaleReport } from "./tests";
export { FeedToken } from "./feed";
export { Listing, Order, PaymentEvent, type OrderStatus } from "./shop";
