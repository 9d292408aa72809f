import { hashPassword } from "../auth";
import { writeTransaction } from "../db";
import { DomainError } from "../errors";
import { User, type Role } from "../models";
import { copyStarterShelf } from "./shelf";

export async function signUp(input: {
  name: string;
  email: string;
  password: string;
  role: Extract<Role, "coach" | "athlete">;
  timezone: string;
}): Promise<User> {
  const passwordHash = await hashPassword(input.password);
  return writeTransaction(async (transaction) => {
    const taken = await User.findOne({ where: { email: input.email }, transaction });
    if (taken)
      throw new DomainError("invalid", "An account with this e-mail already exists. Sign in or reset your password.", {
        field: "email",
      });
    const user = await User.create(
      { name: input.name, email: input.email, passwordHash, role: input.role, timezone: input.timezone },
      { transaction },
    );
    // A new coach starts with something on the shelf to drag onto a plan.
    if (user.role === "coach") await copyStarterShelf(user.id, transaction);
    return user;
  });
}
