// Every operation's file, for the code that calls their inline rules directly (executors, dimension checks).
#pragma once

#include "ops/add.hpp"
#include "ops/div.hpp"
#include "ops/exp.hpp"
#include "ops/list.hpp"
#include "ops/log.hpp"
#include "ops/mul.hpp"
#include "ops/neg.hpp"
#include "ops/pow.hpp"
#include "ops/sqrt.hpp"
#include "ops/sub.hpp"
