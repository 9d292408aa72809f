import { writeTransaction } from "../db";
import { DomainError } from "../errors";
import { User, type Role } from "../models";

export async function changeRole(admin: User, userId: number, role: Role) {
  if (admin.id === userId && role !== "admin")
    throw new DomainError("invalid", "You cannot remove your own admin role; ask another admin.", { field: "role" });
  return writeTransaction(async (transaction) => {
    const user = await User.findByPk(userId, { transaction });
    if (!user) throw new DomainError("invalid", "That user no longer exists.");
    user.role = role;
    await user.save({ transaction });
    return user;
  });
}
